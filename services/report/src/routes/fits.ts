import type { FastifyInstance } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { listCurveFits, listRegionNames, listStageProblems, problemView, WHOLE_FOREST_TYPE_SCOPE, type FitScope } from '@stemwise/db';
import { csvHeader, csvLine, FIT_COLUMNS, toFitRow, type Row } from '@stemwise/core';
import { canSeeRegion, readsRegions, type Principal } from '../access';
import type { SnapshotFitRow } from '../snapshot-payload';
import { denyJson, requireToken, type RouteContext } from './auth';
import { wantsCsv } from './regions';
import { ErrorBody, FitList, FitsQuery } from './schemas';

const FIT_CSV_COLUMNS = ['scope', ...FIT_COLUMNS];

/**
 * Diversity–disturbance fits. Scope `all` (a forest type as a whole, across regions) is shown to every
 * reader: it is forest-type-wide science and names no region. Region-scope fits are shown only for the
 * regions a reader's token names.
 */
export function fitRoutes(app: FastifyInstance, ctx: RouteContext): void {
  app.withTypeProvider<ZodTypeProvider>().get(
    '/v1/fits',
    {
      preValidation: requireToken(ctx, { cookie: true }),
      schema: {
        summary: 'Diversity–disturbance fits per forest type (scope all) and per region (readers: their regions only)',
        tags: ['fits'],
        security: [{ bearer: [] }],
        querystring: FitsQuery,
        response: { 200: FitList, 401: ErrorBody, 403: ErrorBody },
      },
    },
    async (request, reply) => {
      const p = request.principal as Principal;
      if (!readsRegions(p)) return denyJson(reply, 403, 'forbidden', 'this token may submit and follow batches only; fits need a reader or admin token');
      const q = request.query;
      const { config, db } = ctx.deps;
      const regions = p.role === 'admin' ? await listRegionNames(db) : p.regions.filter((r) => canSeeRegion(p, r));
      // `?scope=all` is the forest type as a whole; a region literally named `all` is read with `?region=all`.
      const whole: FitScope = { kind: 'forest_type' };
      const askedRegion = q.region ?? (q.scope && q.scope !== WHOLE_FOREST_TYPE_SCOPE ? q.scope : null);
      if (askedRegion !== null && !regions.includes(askedRegion) && p.role !== 'admin') return denyJson(reply, 403, 'forbidden', `this token may not see region '${askedRegion}'`);
      const scopes: FitScope[] = askedRegion !== null ? [{ kind: 'region', region: askedRegion }] : q.scope ? [whole] : [whole, ...regions.map((region) => ({ kind: 'region' as const, region }))];
      const fits: SnapshotFitRow[] = [];
      for (const scope of scopes) {
        const rows = await listCurveFits(db, { scope, metric: q.metric ?? config.fitMetric, axis: q.axis ?? config.fitAxis, forestTypes: q.forest_type ? [q.forest_type] : undefined });
        for (const r of rows) fits.push({ scope: r.scope, ...(toFitRow(r) as Omit<SnapshotFitRow, 'scope'>) });
      }
      const shown = (region: string | null) => scopes.some((s) => (s.kind === 'region' ? s.region === region : region === null));
      const problems = (await listStageProblems(db, 'fit'))
        .filter((f) => shown(f.region) && (!q.forest_type || f.forestType === q.forest_type))
        .map(problemView);
      if (wantsCsv(q.format, request.headers.accept)) {
        let out = csvHeader(FIT_CSV_COLUMNS);
        for (const f of fits) out += csvLine(FIT_CSV_COLUMNS, f as unknown as Row);
        return reply.type('text/csv; charset=utf-8').send(out as never);
      }
      return problems.length ? { fits, problems } : { fits };
    },
  );
}
