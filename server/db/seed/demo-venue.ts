import { PhotoRow } from '../../features/photos/photo.entity';
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
  { code: 'full', name: 'Full brick', massKg: 20 * LB, heightM: 0.0508, widthM: null, depthM: null, bridgeCount: 60 },
  { code: 'half', name: 'Half brick', massKg: 10 * LB, heightM: 0.0254, widthM: null, depthM: null, bridgeCount: 24 },
];

interface DemoPiece {
  name: string;
  lb: number;
  /** At a point, ft from the stage-left end of the batten. */
  positionFt?: number;
  /** Spread from-to, ft from the stage-left end; neither = spread along the whole batten. */
  spreadFt?: [number, number];
  department?: string;
  notes?: string;
}

interface DemoLineSet {
  number: number;
  name: string;
  purchase: 1 | 2;
  pieces: DemoPiece[];
  /** High and low trims, ft above the stage floor. */
  trimsFt?: [number, number];
  notes?: string;
  outOfService?: string;
}

const drape = (name: string, lb: number, notes = ''): DemoPiece => ({ name, lb, department: 'Soft goods', notes });
const border = (n: number, lb = 45) => drape(`Black border ${n}`, lb);
const legs = (n: number): DemoPiece[] => [
  { name: `Leg ${n} stage left`, lb: 30, spreadFt: [0, 8], department: 'Soft goods' },
  { name: `Leg ${n} stage right`, lb: 30, spreadFt: [32, 40], department: 'Soft goods' },
];
const electric = (n: number, lb: number): DemoPiece[] => [
  { name: `Electric ${n} fixtures and cable`, lb, department: 'Lighting' },
];

/**
 * The fly plot of "The Lantern Keeper's Daughter": borders and legs, electrics on double purchase,
 * drops, scenery at points and spread, spare pipes, one set out of service. Line sets 2, 5, 7, 9, 12
 * and 15 are the ones the walk-through and the tests use: keep them as they are.
 */
const LINE_SETS: DemoLineSet[] = [
  { number: 1, name: 'House curtain', purchase: 1, pieces: [drape('Red velour main curtain', 180, 'Guillotine; do not fly during the house call')], trimsFt: [28, 0] },
  { number: 2, name: 'Main border', purchase: 1, pieces: [{ name: 'Black border 1', lb: 45 }], trimsFt: [30, 18] },
  { number: 3, name: 'Legs 1', purchase: 1, pieces: legs(1), trimsFt: [30, 0] },
  { number: 4, name: 'Show portal', purchase: 1, pieces: [{ name: 'Lighthouse portal header', lb: 120, spreadFt: [4, 36], department: 'Scenery' }], trimsFt: [26, 17] },
  { number: 5, name: 'Harbour sky', purchase: 1, pieces: [{ name: 'Sky drop, dusk', lb: 95 }], trimsFt: [32, 0] },
  { number: 6, name: 'Border 2', purchase: 1, pieces: [border(2)], trimsFt: [30, 19] },
  { number: 7, name: 'Sea-mist drapes', purchase: 1, pieces: [{ name: 'Sea-mist drape A', lb: 40 }, { name: 'Sea-mist drape B', lb: 40 }], trimsFt: [30, 0] },
  { number: 8, name: 'Legs 2', purchase: 1, pieces: legs(2), trimsFt: [30, 0] },
  { number: 9, name: 'Lighthouse lamp', purchase: 1, pieces: [{ name: 'Lamp room flat', lb: 150, positionFt: 20 }], trimsFt: [34, 9] },
  { number: 10, name: 'Gull flight', purchase: 1, pieces: [
    { name: 'Gull cut-out left', lb: 12, positionFt: 11, department: 'Scenery' },
    { name: 'Gull cut-out right', lb: 12, positionFt: 29, department: 'Scenery' },
  ], trimsFt: [36, 14] },
  { number: 11, name: 'Border 3', purchase: 1, pieces: [border(3)], trimsFt: [30, 20] },
  { number: 12, name: 'First electric', purchase: 2, pieces: [{ name: 'Electric 1 fixtures and cable', lb: 310 }], trimsFt: [24, 4] },
  { number: 13, name: 'Legs 3', purchase: 1, pieces: legs(3), trimsFt: [30, 0] },
  { number: 14, name: 'Harbour wall', purchase: 1, pieces: [{ name: 'Harbour wall flat', lb: 160, spreadFt: [6, 22], department: 'Scenery', notes: 'Breasted upstage at low trim' }], trimsFt: [35, 0] },
  { number: 15, name: 'Spare pipe', purchase: 1, pieces: [] },
  { number: 16, name: 'Rain curtain', purchase: 1, pieces: [drape('Silver rain strings', 55)], trimsFt: [33, 0] },
  { number: 17, name: 'Border 4', purchase: 1, pieces: [border(4)], trimsFt: [30, 21] },
  { number: 18, name: 'Fishing nets', purchase: 1, pieces: [
    { name: 'Net swag', lb: 35, spreadFt: [10, 30], department: 'Props' },
    { name: 'Float cluster', lb: 18, positionFt: 20, department: 'Props' },
  ], trimsFt: [34, 12] },
  { number: 19, name: 'Spare pipe', purchase: 1, pieces: [] },
  { number: 20, name: 'Second electric', purchase: 2, pieces: electric(2, 280), trimsFt: [25, 4] },
  { number: 21, name: 'Legs 4', purchase: 1, pieces: legs(4), trimsFt: [30, 0] },
  { number: 22, name: 'Spare pipe', purchase: 1, pieces: [], outOfService: 'Loft block bearing grinding: inspection booked' },
  { number: 23, name: 'Keeper\'s cottage', purchase: 1, pieces: [
    { name: 'Cottage roof', lb: 140, spreadFt: [12, 28], department: 'Scenery' },
    { name: 'Chimney', lb: 40, positionFt: 24, department: 'Scenery' },
  ], trimsFt: [36, 0] },
  { number: 24, name: 'Storm drop', purchase: 1, pieces: [drape('Storm cloud drop', 90)], trimsFt: [32, 0] },
  { number: 25, name: 'Border 5', purchase: 1, pieces: [border(5)], trimsFt: [30, 22] },
  { number: 26, name: 'Moon', purchase: 1, pieces: [{ name: 'Moon disc', lb: 65, positionFt: 27, department: 'Scenery', notes: 'LED inside: cable tied off at the centre line' }], trimsFt: [38, 16] },
  { number: 27, name: 'Legs 5', purchase: 1, pieces: legs(5), trimsFt: [30, 0] },
  { number: 28, name: 'Third electric', purchase: 2, pieces: electric(3, 240), trimsFt: [26, 5] },
  { number: 29, name: 'Spare pipe', purchase: 1, pieces: [] },
  { number: 30, name: 'Scrim', purchase: 1, pieces: [drape('Sharkstooth scrim', 38)], trimsFt: [32, 0] },
  { number: 31, name: 'Border 6', purchase: 1, pieces: [border(6, 50)], trimsFt: [30, 23] },
  { number: 32, name: 'Night sky', purchase: 1, pieces: [drape('Star drop', 85, 'Fibre optic: handle by the pipe only')], trimsFt: [33, 0] },
  { number: 33, name: 'Cyclorama', purchase: 1, pieces: [drape('Muslin cyclorama', 110)], trimsFt: [34, 0] },
  { number: 34, name: 'Cyc lights', purchase: 2, pieces: electric(4, 260), trimsFt: [27, 6] },
  { number: 35, name: 'Spare pipe', purchase: 1, pieces: [] },
  { number: 36, name: 'Upstage black', purchase: 1, pieces: [drape('Black traveller', 120)], trimsFt: [30, 0] },
];

/** Empty arbor and the bricks that balance it, the set pipe-heavy by less than the lightest brick. */
function balancedArbor(pipeKg: number, piecesKg: number, purchase: 1 | 2) {
  // The empty arbor is made to balance most of the bare pipe, as is usual; bricks take the rest.
  const arborKg = Math.round(pipeKg * purchase * 0.8 * 10) / 10;
  const needKg = balancingArborKg(pipeKg + piecesKg, purchase) - arborKg;
  const stock = BRICKS.map((b) => ({ type: b.code, massKg: b.massKg, count: 200 }));
  return { arborKg, bricks: chooseBricks(needKg, stock).picks };
}

const DEMO_PHOTOS = [
  { number: 7, drawn: 'sea-mist-drapes', caption: 'Both drapes on the batten, seen from the deck (a drawing)' },
  { number: 12, drawn: 'first-electric', caption: 'Fixtures and cable under the pipe (a drawing)' },
];

/** Seeds the demo venue. Runs only on an empty database (the caller checks). */
export async function seedDemoVenue(m: EntityManager): Promise<Venue> {
  const venue = await m.getRepository(Venue).save(m.getRepository(Venue).create({
    name: DEMO_VENUE_NAME, units: 'imperial', settings: DEFAULT_VENUE_SETTINGS,
  }));
  await m.getRepository(BrickTypeRow).insert(BRICKS.map((b) => ({ ...b, venueId: venue.id })));

  const lineSetIds = new Map<number, number>();
  for (const ls of LINE_SETS) {
    const pipeKg = BATTEN_KG_PER_M * PIPE_LENGTH_M;
    const piecesKg = ls.pieces.reduce((sum, p) => sum + p.lb * LB, 0);
    const { arborKg, bricks } = balancedArbor(pipeKg, piecesKg, ls.purchase);
    const row = await m.getRepository(LineSetRow).save(m.getRepository(LineSetRow).create({
      venueId: venue.id,
      number: ls.number,
      name: ls.name,
      purchase: ls.purchase,
      distanceM: (1 + ls.number * 0.75) * FT,
      pipeSize: '1-1/2 in Schedule 40',
      pipeKgPerM: BATTEN_KG_PER_M,
      pipeLengthM: PIPE_LENGTH_M,
      pipeKg,
      liftLinesM: LIFT_LINES_M,
      liftLineRatingKg: 500 * LB,
      battenRatingKgPerM: 25 * LB / FT,
      arborKg,
      arborCapacityKg: (ls.purchase === 2 ? 1800 : 1200) * LB,
      highTrimM: ls.trimsFt ? ls.trimsFt[0] * FT : null,
      lowTrimM: ls.trimsFt ? ls.trimsFt[1] * FT : null,
      notes: ls.notes ?? '',
      bricks,
      outOfBalance: false,
      outOfService: ls.outOfService ?? null,
      version: 1,
    }));
    lineSetIds.set(ls.number, row.id);
    if (ls.pieces.length) {
      await m.getRepository(PieceRow).insert(ls.pieces.map((p) => ({
        lineSetId: row.id,
        name: p.name,
        massKg: p.lb * LB,
        positionM: p.positionFt === undefined ? null : p.positionFt * FT,
        spreadFromM: p.spreadFt ? p.spreadFt[0] * FT : null,
        spreadToM: p.spreadFt ? p.spreadFt[1] * FT : null,
        department: p.department ?? '',
        notes: p.notes ?? '',
      })));
    }
  }

  // Photos the project draws itself (server/features/photos/drawings.ts); the server draws the files at start.
  await m.getRepository(PhotoRow).insert(DEMO_PHOTOS.map((p) => ({
    venueId: venue.id,
    lineSetId: lineSetIds.get(p.number)!,
    pieceId: null,
    fileName: `demo-${p.drawn}.jpg`,
    thumbName: `demo-${p.drawn}-thumb.jpg`,
    width: 1200,
    height: 800,
    bytes: 0,
    caption: p.caption,
    drawn: p.drawn,
    uploadedBy: null,
    uploadedAtMs: Date.now(),
  })));

  const passwordHash = await hashPassword(DEMO_PASSWORD);
  for (const account of DEMO_ACCOUNTS) {
    const person = await m.getRepository(Person).save(m.getRepository(Person).create({
      name: account.name, email: account.email, passwordHash, inviteTokenHash: null, inviteExpiresAt: null,
    }));
    await m.getRepository(VenueRole).insert(account.roles.map((role: Role) => ({ venueId: venue.id, personId: person.id, role })));
  }
  return venue;
}
