import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import { Venue } from '../features/venue/venue.entity';
import { grantAppAccount } from './grants';
import { seedDemoVenue } from './seed/demo-venue';

/** Migrates as the schema owner, then sets the application account's rights table by table. */
export async function migrate(owner: DataSource, config: Config): Promise<string[]> {
  const ran = await owner.runMigrations({ transaction: 'each' });
  // MariaDB names an account by where it connects from: the Unix socket is 'localhost', TCP on loopback '127.0.0.1'.
  await grantAppAccount(owner, config.db.database, config.db.user, config.db.socketPath ? 'localhost' : '127.0.0.1');
  return ran.map((m) => m.name);
}

/** Seeds the demo venue into an empty database; a database that has a venue is left alone. */
export async function seedIfEmpty(owner: DataSource): Promise<boolean> {
  if ((await owner.getRepository(Venue).count()) > 0) return false;
  await owner.transaction((m) => seedDemoVenue(m));
  return true;
}
