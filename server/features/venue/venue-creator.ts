import type { DataSource } from 'typeorm';
import type { NewVenueInput } from '@shared/protocol/people';
import { VenueRole } from '../people/venue-role.entity';
import { recordChange } from '../schedule/history';
import { DEFAULT_VENUE_SETTINGS, Venue } from './venue.entity';

/**
 * Another venue opened by a technical director: the venue with the default settings and its creator as
 * its technical director, in one transaction. It starts empty (no line sets, brick types or crew).
 */
export class VenueCreator {
  constructor(private readonly db: DataSource, private readonly now: () => number = Date.now) {}

  async create(person: { id: number; name: string }, input: NewVenueInput): Promise<number> {
    return this.db.transaction(async (m) => {
      const venue = await m.getRepository(Venue).save(m.getRepository(Venue).create({ name: input.name, units: input.units, settings: DEFAULT_VENUE_SETTINGS }));
      await m.getRepository(VenueRole).insert({ venueId: venue.id, personId: person.id, role: 'admin' });
      await recordChange(m, {
        venueId: venue.id, subject: 'venue', subjectId: venue.id, lineSetId: null, action: 'create',
        changes: { name: [null, input.name], units: [null, input.units] },
      }, { personId: person.id, personName: person.name, reason: 'Venue opened' }, this.now());
      return venue.id;
    });
  }
}
