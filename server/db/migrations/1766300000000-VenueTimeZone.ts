import type { MigrationInterface, QueryRunner } from 'typeorm';
import { processTimeZone } from '@shared/protocol/time-zone';

/**
 * Every venue gets a time zone in its settings: the server's own zone (TZ, else the system's; UTC when
 * unknown), which the technical director then corrects in the venue settings. A venue that already
 * names a zone keeps it.
 */
export class VenueTimeZone1766300000000 implements MigrationInterface {
  name = 'VenueTimeZone1766300000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(
      "UPDATE venue SET settings = JSON_SET(settings, '$.timeZone', ?) WHERE JSON_TYPE(JSON_EXTRACT(settings, '$.timeZone')) IS NULL OR JSON_TYPE(JSON_EXTRACT(settings, '$.timeZone')) <> 'STRING'",
      [processTimeZone()],
    );
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query("UPDATE venue SET settings = JSON_REMOVE(settings, '$.timeZone')");
  }
}
