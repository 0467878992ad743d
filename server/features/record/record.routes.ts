import { z } from 'zod';
import { historyQuerySchema, verifyRequestSchema } from '@shared/protocol/record';
import { route, type RouteSpec } from '../../middleware/routes';
import { idParam } from '../../middleware/validate';
import type { RecordService } from './record.service';
import { balanceChartSvg } from './chart';
import { reportCsv } from './report-csv';
import { reportPdf } from './report-pdf';

/** The record is for everyone at the venue (the head of flys' usage log, the stage manager's report). */
const EVERYONE = { roles: 'any' } as const;
const noQuery = z.object({});

/** A file name from the session title: letters, digits and dashes only. */
export const fileName = (id: number, title: string, ext: string) =>
  `railcall-session-${id}-${title.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 40) || 'report'}.${ext}`;

export function recordRoutes(record: RecordService): RouteSpec[] {
  return [
    route({
      method: 'get',
      path: '/record/sessions',
      access: EVERYONE,
      query: historyQuerySchema,
      handler: ({ user, query }) => record.history(user.venueId, query),
    }),
    route({
      method: 'get',
      path: '/record/sessions/:id/report',
      access: EVERYONE,
      params: idParam,
      query: noQuery,
      async handler({ user, params }) {
        const report = await record.report(user.venueId, params.id);
        // The same SVG charts as in the PDF.
        return { report, charts: Object.fromEntries(report.lineSets.map((ls) => [ls.id, balanceChartSvg(ls, report.units)])) };
      },
    }),
    route({
      method: 'get',
      path: '/record/sessions/:id/report.pdf',
      access: EVERYONE,
      params: idParam,
      query: noQuery,
      async handler({ user, params, res }) {
        const report = await record.report(user.venueId, params.id);
        const pdf = await reportPdf(report);
        res.type('application/pdf').attachment(fileName(report.id, report.title, 'pdf')).send(pdf);
        return undefined;
      },
    }),
    route({
      method: 'get',
      path: '/record/sessions/:id/report.csv',
      access: EVERYONE,
      params: idParam,
      query: noQuery,
      async handler({ user, params, res }) {
        const report = await record.report(user.venueId, params.id);
        res.type('text/csv; charset=utf-8').attachment(fileName(report.id, report.title, 'csv')).send(reportCsv(report));
        return undefined;
      },
    }),
    route({
      method: 'get',
      path: '/record/sessions/:id/check',
      access: EVERYONE,
      params: idParam,
      query: noQuery,
      handler: async ({ user, params }) => ({ chain: await record.check(user.venueId, params.id) }),
    }),
    route({
      method: 'post',
      path: '/record/verify',
      access: EVERYONE,
      body: verifyRequestSchema,
      handler: async ({ body }) => record.verifyExport(body.text),
    }),
    route({
      method: 'get',
      path: '/record/line-sets/:id',
      access: EVERYONE,
      params: idParam,
      query: noQuery,
      handler: ({ user, params }) => record.lineSetRecord(user.venueId, params.id),
    }),
  ];
}
