/**
 * What a phone may send to a live loading session, as zod schemas.
 * The server parses every `session:act` payload with `actionEnvelopeSchema`; the client builds its
 * buttons from the same action types. Unknown keys are stripped (zod's default for objects).
 */
import { z } from 'zod';
import { sessionRoleSchema } from '../roles';

/** Plain text a person typed: trimmed, never empty, bounded. */
const said = (maxChars: number) => z.string().trim().min(1, 'Write a few words').max(maxChars);

/**
 * Reasons a hold is called often enough to be one tap each (common practice on a fly floor); any other
 * reason is typed. HOLD itself never waits for a reason: it stops everything at the first tap.
 */
export const QUICK_HOLD_REASONS = [
  'Someone under the gallery',
  'Someone at the rail',
  'Line set moving',
  'Brick not seated in the arbor',
  'Lost sight of the batten',
  'Call not heard',
] as const;

/** Longest free text on a note. */
export const NOTE_MAX_CHARS = 1000;
/** Longest reason (hold, short crew, ending, test note). */
export const REASON_MAX_CHARS = 500;
/** Largest balance estimate a rail operator may record, in kg at the batten. */
export const ESTIMATE_MAX_KG = 2000;
/** Most steps a line set plan may have; confirm-step indexes below this. */
export const MAX_STEPS = 500;
/** Most line sets in one session. */
export const MAX_LINE_SETS = 100;

/**
 * How the lead heard a silent person's "clear" when their phone did not answer: they called it out,
 * said it over the radio or headset, or the lead saw them stand clear.
 */
export const PROXY_CLEAR_VIA = ['voice', 'radio', 'seen'] as const;
export type ProxyClearVia = (typeof PROXY_CLEAR_VIA)[number];

export const lineSetIdSchema = z.string().trim().min(1).max(64);

export const TEST_RESULTS = ['balanced', 'pipe-heavy', 'arbor-heavy'] as const;
export const testResultSchema = z.enum(TEST_RESULTS);
export type TestResult = z.infer<typeof testResultSchema>;

const recordTestSchema = z
  .object({
    type: z.literal('record-test'),
    result: testResultSchema,
    /** How far out of balance, estimated at the rail (kg at the batten). Needed unless balanced. */
    estimateKg: z.number().finite().positive().max(ESTIMATE_MAX_KG).optional(),
    note: said(REASON_MAX_CHARS).optional(),
    /** The rail operator has tied the set off at the rail: needed when it is out by more than the rope lock holds. */
    tiedOff: z.boolean().optional(),
    /** Re-test an earlier line set (after a correction); the line set being worked when left out. */
    lineSetId: lineSetIdSchema.optional(),
  })
  .refine((a) => a.result === 'balanced' || a.estimateKg !== undefined, {
    message: 'Give an estimate in kg for a set that is out of balance',
    path: ['estimateKg'],
  });

/** Every action a person can send, discriminated on `type`. */
export const sessionActionSchema = z.discriminatedUnion('type', [
  z.object({ type: z.literal('join'), role: sessionRoleSchema }),
  z.object({ type: z.literal('leave') }),
  z.object({
    type: z.literal('begin'),
    /** Needed only when the minimum crew has not joined; it goes into the log. */
    shortCrewReason: said(REASON_MAX_CHARS).optional(),
  }),
  z.object({ type: z.literal('call-move') }),
  z.object({ type: z.literal('answer-clear') }),
  z.object({
    type: z.literal('record-clear-for'),
    /** The silent person whose "clear" the lead heard another way, after Railcall re-alerted them. */
    personId: z.number().int().positive(),
    /** How the lead knows they are clear. */
    via: z.enum(PROXY_CLEAR_VIA),
  }),
  z.object({ type: z.literal('confirm-locked') }),
  z.object({ type: z.literal('confirm-tie-off') }),
  z.object({ type: z.literal('call-clear-rail') }),
  z.object({ type: z.literal('confirm-rail-clear') }),
  z.object({
    type: z.literal('confirm-step'),
    /** Index into the line set's plan steps (the same number the plan shows, from 0). */
    stepIndex: z.number().int().min(0).max(MAX_STEPS - 1),
  }),
  z.object({ type: z.literal('call-loading-complete') }),
  z.object({ type: z.literal('confirm-untie') }),
  recordTestSchema,
  z.object({
    type: z.literal('plan-correction'),
    /** The flagged line set to correct; the one tested last when left out. */
    lineSetId: lineSetIdSchema.optional(),
  }),
  z.object({ type: z.literal('call-hold'), reason: said(REASON_MAX_CHARS).optional() }),
  /** The one who called the hold says why, after the tap that stopped everything (a quick choice, then words if wanted). */
  z.object({ type: z.literal('give-hold-reason'), reason: said(REASON_MAX_CHARS) }),
  z.object({ type: z.literal('ack-hold') }),
  z.object({ type: z.literal('release-hold') }),
  z.object({ type: z.literal('note'), text: said(NOTE_MAX_CHARS) }),
  z.object({ type: z.literal('end'), reason: said(REASON_MAX_CHARS) }),
]);
export type SessionAction = z.infer<typeof sessionActionSchema>;
export type ActionType = SessionAction['type'];

/** Every action type a phone can send, in the order a session meets them. */
export const ACTION_TYPES = sessionActionSchema.options.map((o) => o.shape.type.value) as ActionType[];

/**
 * Actions only the server sends for itself (never parsed from a phone).
 * `re-alert`: the venue's re-alert time passed and these people still have not answered "clear".
 */
export const systemActionSchema = z.object({
  type: z.literal('re-alert'),
  personIds: z.array(z.number().int().positive()).min(1).max(200),
});
export type SystemAction = z.infer<typeof systemActionSchema>;

/** What the phone sends with every action: its own idempotency key and clock. */
export const actionEnvelopeSchema = z.object({
  /** Made by the phone once per intended action; a repeat with the same key gets the first answer. */
  key: z
    .string()
    .min(8)
    .max(64)
    .regex(/^[A-Za-z0-9_-]+$/, 'Letters, digits, - and _ only'),
  /** The phone's clock when the person pressed the button (ms since 1970); logged, never trusted. */
  clientTimeMs: z.number().int().min(0).max(8.64e15),
  action: sessionActionSchema,
});
export type ActionEnvelope = z.infer<typeof actionEnvelopeSchema>;

/** The payload of `session:act`. */
export const sessionActPayloadSchema = z.object({
  sessionId: z.number().int().positive(),
  envelope: actionEnvelopeSchema,
});
export type SessionActPayload = z.infer<typeof sessionActPayloadSchema>;

/** The payload of `session:watch`: the phone says the last sequence number it holds, to catch up. */
export const sessionWatchPayloadSchema = z.object({
  sessionId: z.number().int().positive(),
  afterSeq: z.number().int().min(0).optional(),
});
export type SessionWatchPayload = z.infer<typeof sessionWatchPayloadSchema>;

export const sessionUnwatchPayloadSchema = z.object({ sessionId: z.number().int().positive() });

/** Minimum crew per role before the lead may begin without giving a reason. */
export const minCrewSchema = z.object({
  rail: z.number().int().min(1).max(10),
  loader: z.number().int().min(0).max(20),
  deck: z.number().int().min(0).max(20),
});
export type MinCrew = z.infer<typeof minCrewSchema>;

export const sessionSettingsSchema = z.object({
  minCrew: minCrewSchema,
  /** Seconds of silence after a move call before Railcall alerts a person again (venue setting). */
  reAlertSeconds: z.number().int().min(5).max(600),
  /**
   * The venue's units, for every sentence the session writes (corrections, refusals, the log).
   * Sessions stored before it was kept have none and were written in pounds: see sessionUnits.
   */
  units: z.enum(['imperial', 'metric']).optional(),
  /** Stack height between spreader plates (venue setting), for the steps of a correction; none in older sessions. */
  spreaderSpacingM: z.number().positive().optional(),
});
export type SessionSettings = z.infer<typeof sessionSettingsSchema>;

/** At least three people: two loaders on the bridge and an operator at the rail (common practice). */
export const DEFAULT_SETTINGS: SessionSettings = {
  minCrew: { rail: 1, loader: 2, deck: 1 },
  reAlertSeconds: 20,
};
