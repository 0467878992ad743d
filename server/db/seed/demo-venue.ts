import type { EntityManager } from 'typeorm';
import { balancingArborKg, chooseBricks, pipeMassPerMetre } from '@shared/rigging';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '@shared/protocol/http';
import type { Role } from '@shared/protocol/roles';
import { DEFAULT_VENUE_SETTINGS, Venue } from '../../features/venue/venue.entity';
import { Person } from '../../features/people/person.entity';
import { VenueRole } from '../../features/people/venue-role.entity';
import { BrickTypeRow } from '../../features/schedule/brick-type.entity';
import { LineSetRow } from '../../features/schedule/line-set.entity';
import { PieceRow } from '../../features/schedule/piece.entity';
import { hashPassword } from '../../features/auth/password';

const LB = 0.45359237;
const FT = 0.3048;

/** The Larkspur Playhouse, a fictional venue, rigged for its fictional show "The Lantern Keeper's Daughter". */
export const DEMO_VENUE_NAME = 'Larkspur Playhouse';

// NPS 1-1/2 Schedule 40 (ASME B36.10M): OD 48.26 mm, wall 3.68 mm.
const BATTEN_KG_PER_M = pipeMassPerMetre({ outsideDiameterMm: 48.26, wallMm: 3.68 });
const PIPE_LENGTH_M = 40 * FT;
const LIFT_LINES_M = [2, 11, 20, 29, 38].map((ft) => ft * FT);

const BRICKS = [
  { code: 'full', name: 'Full brick', massKg: 20 * LB, heightM: 0.0508, bridgeCount: 60 },
  { code: 'half', name: 'Half brick', massKg: 10 * LB, heightM: 0.0254, bridgeCount: 24 },
];

interface DemoLineSet {
  number: number;
  name: string;
  purchase: 1 | 2;
  pieces: { name: string; lb: number; positionFt?: number }[];
}

const LINE_SETS: DemoLineSet[] = [
  { number: 2, name: 'Main border', purchase: 1, pieces: [{ name: 'Black border 1', lb: 45 }] },
  { number: 5, name: 'Harbour sky', purchase: 1, pieces: [{ name: 'Sky drop, dusk', lb: 95 }] },
  { number: 7, name: 'Sea-mist drapes', purchase: 1, pieces: [{ name: 'Sea-mist drape A', lb: 40 }, { name: 'Sea-mist drape B', lb: 40 }] },
  { number: 9, name: 'Lighthouse lamp', purchase: 1, pieces: [{ name: 'Lamp room flat', lb: 150, positionFt: 20 }] },
  { number: 12, name: 'First electric', purchase: 2, pieces: [{ name: 'Electric 1 fixtures and cable', lb: 310 }] },
  { number: 15, name: 'Spare pipe', purchase: 1, pieces: [] },
];

/** Empty arbor and the bricks that balance it, the set pipe-heavy by less than the lightest brick. */
function balancedArbor(pipeKg: number, piecesKg: number, purchase: 1 | 2) {
  // The empty arbor is made to balance most of the bare pipe, as is usual; bricks take the rest.
  const arborKg = Math.round(pipeKg * purchase * 0.8 * 10) / 10;
  const needKg = balancingArborKg(pipeKg + piecesKg, purchase) - arborKg;
  const stock = BRICKS.map((b) => ({ type: b.code, massKg: b.massKg, count: 200 }));
  return { arborKg, bricks: chooseBricks(needKg, stock).picks };
}

/** Seeds the demo venue. Runs only on an empty database (the caller checks). */
export async function seedDemoVenue(m: EntityManager): Promise<Venue> {
  const venue = await m.getRepository(Venue).save(m.getRepository(Venue).create({
    name: DEMO_VENUE_NAME, units: 'imperial', settings: DEFAULT_VENUE_SETTINGS,
  }));
  await m.getRepository(BrickTypeRow).insert(BRICKS.map((b) => ({ ...b, venueId: venue.id })));

  for (const ls of LINE_SETS) {
    const pipeKg = BATTEN_KG_PER_M * PIPE_LENGTH_M;
    const piecesKg = ls.pieces.reduce((sum, p) => sum + p.lb * LB, 0);
    const { arborKg, bricks } = balancedArbor(pipeKg, piecesKg, ls.purchase);
    const row = await m.getRepository(LineSetRow).save(m.getRepository(LineSetRow).create({
      venueId: venue.id,
      number: ls.number,
      name: ls.name,
      purchase: ls.purchase,
      pipeSize: 'NPS 1-1/2 Sch 40',
      pipeLengthM: PIPE_LENGTH_M,
      pipeKg,
      liftLinesM: LIFT_LINES_M,
      liftLineRatingKg: 500 * LB,
      battenRatingKgPerM: 25 * LB / FT,
      arborKg,
      arborCapacityKg: (ls.purchase === 2 ? 1800 : 1200) * LB,
      bricks,
      outOfBalance: false,
    }));
    if (ls.pieces.length) {
      await m.getRepository(PieceRow).insert(ls.pieces.map((p) => ({
        lineSetId: row.id, name: p.name, massKg: p.lb * LB, positionM: p.positionFt === undefined ? null : p.positionFt * FT,
      })));
    }
  }

  const passwordHash = await hashPassword(DEMO_PASSWORD);
  for (const account of DEMO_ACCOUNTS) {
    const person = await m.getRepository(Person).save(m.getRepository(Person).create({
      name: account.name, email: account.email, passwordHash, inviteTokenHash: null, inviteExpiresAt: null,
    }));
    await m.getRepository(VenueRole).insert(account.roles.map((role: Role) => ({ venueId: venue.id, personId: person.id, role })));
  }
  return venue;
}
