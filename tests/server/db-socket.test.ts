import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/config';

describe('the database connection setting', () => {
  it('uses TCP on loopback unless a Unix socket is named', () => {
    const tcp = loadConfig({ RAILCALL_SESSION_SECRET: 'x'.repeat(32) });
    expect(tcp.db.socketPath).toBeUndefined();
    expect(tcp.db).toMatchObject({ host: '127.0.0.1', port: 3407 });
  });

  it('names the socket for both the app and the owner account when RAILCALL_DB_SOCKET is set', () => {
    const local = loadConfig({ RAILCALL_SESSION_SECRET: 'x'.repeat(32), RAILCALL_DB_SOCKET: '/run/railcall/db.sock' });
    expect(local.db.socketPath).toBe('/run/railcall/db.sock');
    expect(local.dbOwner.socketPath).toBe('/run/railcall/db.sock');
  });

  it('refuses an empty socket path with the setting named', () => {
    expect(() => loadConfig({ RAILCALL_SESSION_SECRET: 'x'.repeat(32), RAILCALL_DB_SOCKET: '' })).toThrow(/RAILCALL_DB_SOCKET/);
  });
});
