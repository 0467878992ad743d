import { createClient, type RedisClientType } from 'redis';
import { createAdapter } from '@socket.io/redis-streams-adapter';
import type { ServerOptions } from 'socket.io';
import type { Logger } from '../logger';

export type RedisClient = RedisClientType;

/**
 * The Redis client Socket.IO's Redis Streams adapter publishes through. It reconnects by itself
 * (commands wait in its queue meanwhile); `onReconnected` runs each time it is back after a loss.
 */
export async function connectRedis(url: string, logger: Logger): Promise<RedisClient> {
  const client: RedisClient = createClient({
    url,
    socket: { reconnectStrategy: (retries) => Math.min(100 + retries * 100, 1000) },
  });
  let lost = false;
  client.on('error', (error: Error) => {
    if (!lost) logger.warn({ err: error }, 'Redis connection lost; reconnecting');
    lost = true;
  });
  client.on('ready', () => {
    if (lost) logger.info('Redis connection back');
    lost = false;
  });
  await client.connect();
  return client;
}

/**
 * Broadcasts and room queries between server processes. Heartbeats are short so a process that died
 * is forgotten within seconds (its sockets stop counting as present; room queries stop waiting for it).
 * https://socket.io/docs/v4/redis-streams-adapter/
 */
export function redisAdapter(client: RedisClient): NonNullable<ServerOptions['adapter']> {
  return createAdapter(client, { heartbeatInterval: 1000, heartbeatTimeout: 3000, onlyPlaintext: true }) as never;
}
