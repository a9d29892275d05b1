import type { FastifyInstance, FastifyReply } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { readNationalSnapshot } from '../national-snapshot';
import { changeView } from '../summary/change-view';
import { denyJson, requireToken, type RouteContext } from './auth';
import { checkNational } from './national';
import { checkRegion } from './regions';
import { ChangeResponse, ErrorBody, RegionParams, SummaryQuery } from './schemas';

const DESCRIPTION =
  'The estimates of change between visits (net carbon and biomass change, its gains and losses, mortality, recruitment, diameter growth) with their SE, ' +
  '95 % interval, sampling error and n, what each variable means and its unit, and the pairs of visits they come from. The latest summary unless `?version=N`. ' +
  'With no plot measured twice the estimates are empty and coverage is null.';

// Snapshots are read-only JSON: sent as text, like the summaries.
const sendJson = (reply: FastifyReply, body: unknown): FastifyReply => reply.type('application/json; charset=utf-8').send(JSON.stringify(body) as never);

/** Change between visits: a region's (its readers and admins) and the national one (admins only, like every national figure). */
export function changeRoutes(app: FastifyInstance, ctx: RouteContext): void {
  const r = app.withTypeProvider<ZodTypeProvider>();
  const auth = requireToken(ctx, { cookie: true });
  const security = [{ bearer: [] }];
  const Query = SummaryQuery.pick({ version: true });

  r.get(
    '/v1/regions/:region/change',
    {
      preValidation: auth,
      schema: { summary: "A region's estimates of change between visits", description: DESCRIPTION, tags: ['regions'], security, params: RegionParams, querystring: Query, response: { 200: ChangeResponse, 401: ErrorBody, 403: ErrorBody, 404: ErrorBody } },
    },
    async (request, reply) => {
      const { region } = request.params;
      if (!(await checkRegion(ctx, request, reply, region))) return reply;
      const entry = await ctx.cache.get(region, request.query.version);
      if (!entry) return denyJson(reply, 404, 'not_found', request.query.version ? `version ${request.query.version} of the summary of '${region}' does not exist` : `no summary of '${region}' yet: it is assembled by the next recompute`);
      const s = entry.snapshot;
      return sendJson(reply, changeView({ region, version: s.version, createdAt: s.createdAt, rows: s.payload.summary.rows, coverage: s.payload.change, carbonUncertainty: s.payload.carbon_change_uncertainty, treeCarbonUncertainty: s.payload.tree_carbon_change_uncertainty }));
    },
  );

  r.get(
    '/v1/national/change',
    {
      preValidation: auth,
      schema: { summary: 'All regions together: estimates of change between visits (admin tokens only)', description: DESCRIPTION, tags: ['national'], security, querystring: Query, response: { 200: ChangeResponse, 401: ErrorBody, 403: ErrorBody, 404: ErrorBody } },
    },
    async (request, reply) => {
      if (!checkNational(request, reply)) return reply;
      const s = await readNationalSnapshot(ctx.deps.db, request.query.version);
      if (!s) return denyJson(reply, 404, 'not_found', request.query.version ? `version ${request.query.version} of the national summary does not exist` : 'no national summary yet: it is assembled by the next recompute');
      return sendJson(reply, changeView({ version: s.version, createdAt: s.createdAt, rows: s.payload.summary.rows, coverage: s.payload.change, carbonUncertainty: s.payload.carbon_change_uncertainty, treeCarbonUncertainty: s.payload.tree_carbon_change_uncertainty }));
    },
  );
}
