import type { DataSource, EntityManager } from 'typeorm';
import type { BrickTypeView, LineSetView, ScheduleView, VenueView } from '@shared/protocol/schedule';
import { Venue } from '../venue/venue.entity';
import { BrickTypeRow } from './brick-type.entity';
import { LineSetRow } from './line-set.entity';
import { PieceRow } from './piece.entity';

export class ScheduleService {
  constructor(private readonly db: DataSource) {}

  async venue(venueId: number, m: EntityManager = this.db.manager): Promise<VenueView> {
    const v = await m.getRepository(Venue).findOneByOrFail({ id: venueId });
    return { id: v.id, name: v.name, units: v.units, settings: v.settings };
  }

  async brickTypes(venueId: number, m: EntityManager = this.db.manager): Promise<BrickTypeView[]> {
    const rows = await m.getRepository(BrickTypeRow).find({ where: { venueId }, order: { massKg: 'DESC' } });
    return rows.map((b) => ({ code: b.code, name: b.name, massKg: b.massKg, heightM: b.heightM, bridgeCount: b.bridgeCount }));
  }

  async lineSets(venueId: number, m: EntityManager = this.db.manager, ids?: number[]): Promise<LineSetView[]> {
    const qb = m.getRepository(LineSetRow).createQueryBuilder('l').where('l.venue_id = :venueId', { venueId }).orderBy('l.number', 'ASC');
    if (ids) qb.andWhere('l.id IN (:...ids)', { ids: ids.length ? ids : [0] });
    const sets = await qb.getMany();
    const pieces = sets.length
      ? await m.getRepository(PieceRow).createQueryBuilder('p').where('p.line_set_id IN (:...ids)', { ids: sets.map((s) => s.id) }).orderBy('p.id').getMany()
      : [];
    return sets.map((s) => ({
      id: s.id,
      number: s.number,
      name: s.name,
      purchase: s.purchase,
      pipeSize: s.pipeSize,
      pipeLengthM: s.pipeLengthM,
      pipeKg: s.pipeKg,
      liftLinesM: s.liftLinesM,
      liftLineRatingKg: s.liftLineRatingKg,
      battenRatingKgPerM: s.battenRatingKgPerM,
      arborKg: s.arborKg,
      arborCapacityKg: s.arborCapacityKg,
      bricks: s.bricks,
      outOfBalance: !!s.outOfBalance,
      pieces: pieces.filter((p) => p.lineSetId === s.id).map((p) => ({ id: p.id, name: p.name, massKg: p.massKg, positionM: p.positionM })),
    }));
  }

  async schedule(venueId: number): Promise<ScheduleView> {
    const [venue, lineSets, brickTypes] = await Promise.all([this.venue(venueId), this.lineSets(venueId), this.brickTypes(venueId)]);
    return { venue, lineSets, brickTypes };
  }
}
