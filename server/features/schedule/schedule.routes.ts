import {
  bridgeStockSchema,
  brickTypeInputSchema,
  createLineSetSchema,
  deleteLineSetSchema,
  deleteWithReasonSchema,
  lineSetServiceSchema,
  pieceDeleteSchema,
  pieceInputSchema,
  updateLineSetSchema,
  venueInputSchema,
} from '@shared/protocol/schedule';
import express from 'express';
import { z } from 'zod';
import { route, type RouteSpec } from '../../middleware/routes';
import type { ScheduleCsv } from './schedule-csv';
import { idParam } from '../../middleware/validate';
import { HttpError } from '../../middleware/http-error';
import type { ScheduleEditor } from './schedule-edit.service';
import type { ScheduleService } from './schedule.service';

const ADMIN = { roles: ['admin'] } as const;
/** Line set edits: the director, and rail operators when the director grants it (checked in the editor). */
const LINE_SET_EDITORS = { roles: ['admin', 'rail'] } as const;
/** Pieces and their weights: the director and rail operators. */
const PIECE_EDITORS = { roles: ['admin', 'rail'] } as const;

/** Everyone at the venue reads the schedule: the crew needs the weights as much as the lead. */
/** A schedule CSV is sent as the body itself (text/csv), up to 2 MB: 200 line sets of 5 pieces is about 150 kB. */
const csvBody = express.text({ type: ['text/csv', 'text/plain'], limit: '2mb' });
const csvText = (body: unknown): string => {
  if (typeof body !== 'string' || body.trim() === '') throw new HttpError('bad-input', 'Send the CSV file as the request body (text/csv).', { file: ['Choose a CSV file'] });
  return body;
};
const importQuery = z.object({ token: z.string().regex(/^[0-9a-f]{64}$/, 'Preview the file first') });

export function scheduleRoutes(schedule: ScheduleService, editor: ScheduleEditor, csv: ScheduleCsv): RouteSpec[] {
  return [
    route({
      method: 'get',
      path: '/venue',
      access: { roles: 'any' },
      handler: async ({ user }) => ({ venue: await schedule.venue(user.venueId) }),
    }),
    route({
      method: 'put',
      path: '/venue',
      access: ADMIN,
      body: venueInputSchema,
      handler: async ({ user, body }) => ({ venue: await editor.updateVenue(user, body) }),
    }),
    route({
      method: 'get',
      path: '/venue/history',
      access: ADMIN,
      handler: async ({ user }) => ({ entries: await editor.venueHistory(user) }),
    }),
    route({
      method: 'get',
      path: '/schedule',
      access: { roles: 'any' },
      handler: ({ user }) => schedule.schedule(user.venueId),
    }),
    route({
      method: 'get',
      path: '/schedule/csv',
      access: { roles: 'any' },
      async handler({ user, res }) {
        const { csv: text, venueName } = await csv.export(user.venueId);
        const name = venueName.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'venue';
        res.type('text/csv; charset=utf-8').attachment(`${name}-schedule.csv`).send(text);
        return undefined;
      },
    }),
    route({
      method: 'post',
      path: '/schedule/csv/preview',
      access: LINE_SET_EDITORS,
      before: [csvBody],
      handler: async ({ user, req }) => csv.preview(user, csvText(req.body)),
    }),
    route({
      method: 'post',
      path: '/schedule/csv/import',
      access: LINE_SET_EDITORS,
      before: [csvBody],
      query: importQuery,
      handler: async ({ user, req, query }) => csv.import(user, csvText(req.body), query.token),
    }),
    route({
      method: 'post',
      path: '/line-sets',
      access: LINE_SET_EDITORS,
      status: 201,
      body: createLineSetSchema,
      handler: async ({ user, body }) => ({ lineSet: await editor.createLineSet(user, body.lineSet, body.reason) }),
    }),
    route({
      method: 'put',
      path: '/line-sets/:id',
      access: LINE_SET_EDITORS,
      params: idParam,
      body: updateLineSetSchema,
      handler: async ({ user, params, body }) => ({ lineSet: await editor.updateLineSet(user, params.id, body.lineSet, body.version, body.reason) }),
    }),
    route({
      method: 'delete',
      path: '/line-sets/:id',
      access: LINE_SET_EDITORS,
      params: idParam,
      body: deleteLineSetSchema,
      async handler({ user, params, body, res }) {
        await editor.deleteLineSet(user, params.id, body.version, body.reason);
        res.status(204).end();
        return undefined;
      },
    }),
    route({
      method: 'put',
      path: '/line-sets/:id/service',
      access: LINE_SET_EDITORS,
      params: idParam,
      body: lineSetServiceSchema,
      handler: async ({ user, params, body }) => ({ lineSet: await editor.setService(user, params.id, body) }),
    }),
    route({
      method: 'get',
      path: '/line-sets/:id/history',
      access: { roles: 'any' },
      params: idParam,
      handler: ({ user, params }) => editor.lineSetHistory(user, params.id),
    }),
    route({
      method: 'post',
      path: '/line-sets/:id/pieces',
      access: PIECE_EDITORS,
      status: 201,
      params: idParam,
      body: pieceInputSchema,
      handler: async ({ user, params, body }) => ({ lineSet: await editor.addPiece(user, params.id, body.piece, body.version, body.reason) }),
    }),
    route({
      method: 'put',
      path: '/pieces/:id',
      access: PIECE_EDITORS,
      params: idParam,
      body: pieceInputSchema,
      handler: async ({ user, params, body }) => ({ lineSet: await editor.updatePiece(user, params.id, body.piece, body.version, body.reason) }),
    }),
    route({
      method: 'delete',
      path: '/pieces/:id',
      access: PIECE_EDITORS,
      params: idParam,
      body: pieceDeleteSchema,
      handler: async ({ user, params, body }) => ({ lineSet: await editor.deletePiece(user, params.id, body.version, body.reason) }),
    }),
    route({
      method: 'post',
      path: '/brick-types',
      access: ADMIN,
      status: 201,
      body: brickTypeInputSchema,
      handler: async ({ user, body }) => ({ brickType: await editor.createBrickType(user, body.brickType, body.reason) }),
    }),
    route({
      method: 'put',
      path: '/brick-types/:id',
      access: ADMIN,
      params: idParam,
      body: brickTypeInputSchema,
      handler: async ({ user, params, body }) => ({ brickType: await editor.updateBrickType(user, params.id, body.brickType, body.reason) }),
    }),
    route({
      method: 'delete',
      path: '/brick-types/:id',
      access: ADMIN,
      params: idParam,
      body: deleteWithReasonSchema,
      async handler({ user, params, body, res }) {
        await editor.deleteBrickType(user, params.id, body.reason);
        res.status(204).end();
        return undefined;
      },
    }),
    route({
      method: 'put',
      path: '/brick-types/:id/stock',
      access: ADMIN,
      params: idParam,
      body: bridgeStockSchema,
      handler: async ({ user, params, body }) => ({ brickType: await editor.setBridgeStock(user, params.id, body.bridgeCount, body.reason) }),
    }),
  ];
}
