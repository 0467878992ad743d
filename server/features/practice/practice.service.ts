import { randomInt } from 'node:crypto';
import type { DataSource } from 'typeorm';
import {
  computeDebrief,
  inventedLineSet,
  practiceTapProblem,
  replayPractice,
  type PracticeSetup,
} from '@shared/practice';
import {
  type FinishPracticeInput,
  type PracticeDetail,
  type PracticeStart,
  type PracticeSummary,
  type startPracticeSchema,
} from '@shared/protocol/practice';
import { createSessionState, SessionPlanError, type LineSetInput } from '@shared/protocol/session';
import { lineSetKey, planSession, sessionPlanErrors } from '@shared/protocol/sessions-api';
import type { z } from 'zod';
import { HttpError, notFound } from '../../middleware/http-error';
import type { SignedInUser } from '../people/people.service';
import { Person } from '../people/person.entity';
import type { ScheduleService } from '../schedule/schedule.service';
import { PracticeRunRow } from './practice.entity';

type StartInput = z.infer<typeof startPracticeSchema>;

/** Clock difference allowed between a phone and the server when a practice is kept. */
const CLOCK_SLACK_MS = 5 * 60_000;

/**
 * Practice sessions: set up from the venue's schedule (read only) or invented, and kept after the
 * server plays their taps again through the shared rules. Writes to `practice_run` and nothing else.
 */
export class PracticeService {
  constructor(
    private readonly db: DataSource,
    private readonly schedule: ScheduleService,
  ) {}

  async start(user: SignedInUser, input: StartInput, nowMs = Date.now()): Promise<PracticeStart> {
    const venue = await this.schedule.venue(user.venueId);
    const seed = randomInt(1, 2 ** 31 - 1);
    let lineSets: LineSetInput[];
    let title: string;
    if (input.source.kind === 'invented') {
      const invented = inventedLineSet(seed, venue.settings.ropeLockLimitKg);
      lineSets = [invented];
      title = `Practice on an invented set: ${invented.name}`;
    } else {
      const ids = input.source.lineSets.map((l) => l.lineSetId);
      const found = await this.schedule.lineSets(user.venueId, this.db.manager, ids);
      const missing = ids.filter((id) => !found.some((l) => l.id === id));
      if (missing.length) throw new HttpError('bad-input', `No such line set at this venue: ${missing.join(', ')}.`, { lineSets: ['Unknown line set'] });
      const brickTypes = await this.schedule.brickTypes(user.venueId);
      // Planned from a copy of the schedule: the real bridge stock is read, never written.
      const planned = planSession({ venue, lineSets: found, brickTypes }, { title: 'practice', lineSets: input.source.lineSets });
      const errors = sessionPlanErrors(planned);
      if (errors.length) throw new HttpError('bad-input', `The plan cannot be run: ${errors.join(' ')}`, { lineSets: errors });
      lineSets = planned.map((p) => ({
        id: lineSetKey(p.scheduleId),
        name: p.name,
        steps: p.result.steps,
        load: { purchase: p.input.purchase, pipeKg: p.input.pipeKg, arborKg: p.input.arborKg, pieces: p.input.pieces, bricks: p.input.bricks },
        brickTypes: p.input.brickTypes,
        ropeLockLimitKg: p.input.ropeLockLimitKg,
        pieceNames: p.pieceNames,
      }));
      title = `Practice on ${planned.map((p) => p.name).join(', ')}`;
    }
    const setup: PracticeSetup = {
      title: title.slice(0, 160),
      role: input.role,
      you: { personId: user.id, name: user.name },
      session: { lineSets, settings: { minCrew: venue.settings.minCrew, reAlertSeconds: venue.settings.reAlertSeconds, units: venue.units, spreaderSpacingM: venue.settings.spreaderPlateEveryM } },
    };
    try {
      createSessionState(setup.session);
    } catch (error) {
      if (error instanceof SessionPlanError) throw new HttpError('bad-input', `The plan cannot be run: ${error.message}`);
      throw error;
    }
    const repo = this.db.getRepository(PracticeRunRow);
    const row = await repo.save(repo.create({
      venueId: user.venueId,
      personId: user.id,
      role: input.role,
      title: setup.title,
      source: input.source.kind,
      seed,
      pace: input.pace,
      setup,
      taps: null,
      debrief: null,
      outcome: 'running',
      startedAtMs: nowMs,
      endedAtMs: null,
    }));
    return { practice: this.summary(row, user.name), setup, seed, pace: input.pace };
  }

  /** Keeps a finished practice: its taps played again through the rules, the debrief computed here. */
  async finish(user: SignedInUser, id: number, input: FinishPracticeInput, nowMs = Date.now()): Promise<PracticeDetail> {
    const row = await this.db.transaction(async (m) => {
      const repo = m.getRepository(PracticeRunRow);
      const row = await repo.createQueryBuilder('p').setLock('pessimistic_write')
        .where('p.id = :id AND p.venue_id = :venueId AND p.person_id = :personId', { id, venueId: user.venueId, personId: user.id })
        .getOne();
      if (!row) throw notFound('That practice');
      if (row.outcome !== 'running') throw new HttpError('conflict', 'This practice has already been kept.');
      const { taps, endedAtMs } = input;
      const firstMs = taps[0].atMs;
      const lastMs = taps.at(-1)!.atMs;
      if (firstMs < row.startedAtMs - CLOCK_SLACK_MS || lastMs > nowMs + CLOCK_SLACK_MS) {
        throw new HttpError('bad-input', 'The practice taps are not from the time this practice ran.', { taps: ['Out of time'] });
      }
      if (endedAtMs < lastMs) throw new HttpError('bad-input', 'The practice cannot end before its last tap.', { endedAtMs: ['Before the last tap'] });
      const problem = practiceTapProblem(row.setup, taps);
      if (problem) throw new HttpError('bad-input', `This practice cannot be kept: ${problem}`, { taps: [problem] });
      const debrief = computeDebrief(row.setup, taps, endedAtMs);
      row.taps = taps;
      row.debrief = debrief;
      row.outcome = debrief.outcome;
      row.endedAtMs = endedAtMs;
      await repo.save(row);
      return row;
    });
    return this.detail(row, user.name);
  }

  async get(user: SignedInUser, id: number): Promise<PracticeDetail> {
    const row = await this.db.getRepository(PracticeRunRow).findOneBy({ id, venueId: user.venueId });
    // Someone else's practice is theirs and the technical director's only.
    if (!row || (row.personId !== user.id && !user.roles.includes('admin'))) throw notFound('That practice');
    const person = await this.db.getRepository(Person).findOneBy({ id: row.personId });
    return this.detail(row, person?.name ?? 'Someone');
  }

  /** The venue's training record (technical director) or a person's own practices. */
  async list(user: SignedInUser, filter: { personId?: number }): Promise<PracticeSummary[]> {
    const admin = user.roles.includes('admin');
    const personId = admin ? filter.personId : user.id;
    const rows = await this.db.getRepository(PracticeRunRow).find({
      where: { venueId: user.venueId, ...(personId ? { personId } : {}) },
      order: { startedAtMs: 'DESC', id: 'DESC' },
      take: 500,
    });
    const people = new Map((await this.db.getRepository(Person).findBy({})).map((p) => [p.id, p.name]));
    return rows.map((row) => this.summary(row, people.get(row.personId) ?? 'Someone'));
  }

  private summary(row: PracticeRunRow, personName: string): PracticeSummary {
    const d = row.debrief;
    return {
      id: row.id,
      personId: row.personId,
      personName,
      role: row.role,
      title: row.title,
      source: row.source,
      startedAtMs: row.startedAtMs,
      endedAtMs: row.endedAtMs,
      outcome: row.outcome,
      figures: d
        ? {
            durationMs: d.durationMs,
            outOfBalanceMs: d.outOfBalanceMs,
            beyondRopeLockMs: d.beyondRopeLockMs,
            yourRefusals: d.yourRefusals,
            yourMedianAnswerMs: d.yourMedianAnswerMs,
            reAlerts: d.reAlerts,
          }
        : null,
    };
  }

  private detail(row: PracticeRunRow, personName: string): PracticeDetail {
    const log = row.taps ? replayPractice(row.setup, row.taps).log : [];
    return { practice: this.summary(row, personName), setup: row.setup, debrief: row.debrief, log };
  }
}
