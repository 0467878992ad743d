import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { io as connect, type Socket } from 'socket.io-client';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import { startTestApp, type TestApp } from '../support/app';
import { cookieOf } from '../support/people';

function open(url: string, cookie?: string): Socket {
  return connect(url, { transports: ['websocket'], reconnection: false, forceNew: true, extraHeaders: cookie ? { Cookie: cookie } : {} });
}

const once = <T = unknown>(socket: Socket, event: string) => new Promise<T>((resolve) => socket.once(event, resolve as never));

describe('Socket.IO sign-in', () => {
  let t: TestApp;
  beforeAll(async () => { t = await startTestApp(); });
  afterAll(async () => { await t.close(); });

  const signIn = async (email: string) => cookieOf(await request(t.url).post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }));

  it('refuses a socket without a signed-in person', async () => {
    const socket = open(t.url);
    const error = await once<Error>(socket, 'connect_error');
    expect(error.message).toMatch(/websocket error|401|unauthorized/i);
    expect(socket.connected).toBe(false);
    socket.close();
  });

  it('accepts a socket that carries the sign-in cookie', async () => {
    const socket = open(t.url, await signIn('deck@larkspur.example'));
    await once(socket, 'connect');
    expect(socket.connected).toBe(true);
    socket.close();
  });

  it('tells and disconnects the sockets of a sign-in when it signs out, and only those', async () => {
    const cookie = await signIn('rail@larkspur.example');
    const other = await signIn('rail@larkspur.example');
    const socket = open(t.url, cookie);
    const bystander = open(t.url, other);
    await Promise.all([once(socket, 'connect'), once(bystander, 'connect')]);
    const told = once(socket, 'auth:signed-out');
    const closed = once<string>(socket, 'disconnect');
    expect((await request(t.url).post('/api/auth/sign-out').set('Cookie', cookie)).status).toBe(204);
    await told;
    expect(await closed).toBe('io server disconnect');
    expect(bystander.connected).toBe(true);
    // The ended sign-in cannot open a new socket.
    const again = open(t.url, cookie);
    await once(again, 'connect_error');
    again.close();
    bystander.close();
  });
});
