import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { listNationalVersions, listRegionHeads, listSummaryVersions } from '@stemwise/db';
import { regionPlotsGeoJson } from '../plots-geojson';
import { canSeeNational, canSeeRegion, readsRegions, type Principal } from '../access';
import { denyJson, requireToken, type Deny, type RouteContext } from './auth';
import { ErrorBody, GeoJsonCollection, RegionList, RegionParams, SummaryQuery, SummaryResponse, VersionList } from './schemas';

const enc = encodeURIComponent;
export const regionLinks = (region: string) => ({
  summary: `/v1/regions/${enc(region)}/summary`,
  summary_csv: `/v1/regions/${enc(region)}/summary?format=csv`,
  plots: `/v1/regions/${enc(region)}/plots`,
  change: `/v1/regions/${enc(region)}/change`,
  page: `/regions/${enc(region)}`,
});

export const NATIONAL_LINKS = { summary: '/v1/national/summary', summary_csv: '/v1/national/summary?format=csv', versions: '/v1/national/versions', change: '/v1/national/change', page: '/national' } as const;

/** Regions a principal may see, among those that exist (a reader never learns of the others). */
export function visibleRegions<T extends { region: string }>(p: Principal, regions: readonly T[]): T[] {
  return regions.filter((r) => canSeeRegion(p, r.region));
}

/**
 * 403 for a role without region data or a region not on a reader's token (whether or not it exists,
 * so existence does not leak), 404 for a visible region that does not exist. True when allowed.
 */
export async function checkRegion(ctx: RouteContext, request: FastifyRequest, reply: FastifyReply, region: string, deny: Deny = denyJson): Promise<boolean> {
  const p = request.principal as Principal;
  if (!readsRegions(p)) {
    deny(reply, 403, 'forbidden', 'this token may submit and follow batches only; region data needs a reader or admin token');
    return false;
  }
  if (!canSeeRegion(p, region)) {
    deny(reply, 403, 'forbidden', `this token may not see region '${region}'`);
    return false;
  }
  if (!(await ctx.cache.regionExists(region))) {
    deny(reply, 404, 'not_found', `no region named '${region}'`);
    return false;
  }
  return true;
}

/** True when the request's If-None-Match names this entity tag (or is `*`). */
export function matchesEtag(header: string | undefined, etag: string): boolean {
  if (!header) return false;
  if (header.trim() === '*') return true;
  return header.split(',').some((t) => t.trim().replace(/^W\//, '') === etag);
}

export function wantsCsv(format: string | undefined, accept: string | undefined): boolean {
  if (format) return format === 'csv';
  return !!accept && /\btext\/csv\b/i.test(accept) && !/application\/json/i.test(accept);
}

/** A summary (a region's or the national one) as JSON or CSV, with its ETag and version; 304 when it matches. */
export function sendSummary(
  request: FastifyRequest,
  reply: FastifyReply,
  s: { name: string; etag: string; version: number; json: string | Buffer; csv: string | Buffer },
): FastifyReply {
  const csv = wantsCsv((request.query as { format?: string }).format, request.headers.accept);
  const etag = `"${s.etag}${csv ? '.csv' : ''}"`;
  reply.header('etag', etag).header('cache-control', 'private, no-cache').header('vary', 'Accept, Authorization, Cookie').header('x-summary-version', String(s.version));
  if (matchesEtag(request.headers['if-none-match'], etag)) return reply.code(304).send(undefined as never);
  if (csv) {
    const file = `summary-${s.name.replace(/[^A-Za-z0-9_.-]+/g, '_')}-v${s.version}.csv`;
    return reply.type('text/csv; charset=utf-8').header('content-disposition', `attachment; filename="${file}"`).send(s.csv as never);
  }
  return reply.type('application/json; charset=utf-8').send(s.json as never);
}

export function regionRoutes(app: FastifyInstance, ctx: RouteContext): void {
  const r = app.withTypeProvider<ZodTypeProvider>();
  const auth = requireToken(ctx, { cookie: true });
  const security = [{ bearer: [] }];

  r.get(
    '/v1/regions',
    {
      preValidation: auth,
      schema: {
        summary: 'Regions this token may see, with their latest summary version (and the national summary for admins)',
        tags: ['regions'],
        security,
        response: { 200: RegionList, 401: ErrorBody, 403: ErrorBody },
      },
    },
    async (request, reply) => {
      const p = request.principal as Principal;
      if (!readsRegions(p)) return denyJson(reply, 403, 'forbidden', 'this token may submit and follow batches only; region data needs a reader or admin token');
      const heads = visibleRegions(p, await listRegionHeads(ctx.deps.db));
      const national = canSeeNational(p) ? ((await listNationalVersions(ctx.deps.db))[0] ?? null) : undefined;
      return {
        ...(national === undefined ? {} : { national: { latest_version: national?.version ?? null, updated_at: national?.createdAt.toISOString() ?? null, links: NATIONAL_LINKS } }),
        regions: heads.map((h) => ({
          region: h.region,
          plots: h.plots,
          latest_version: h.head?.version ?? null,
          updated_at: h.head?.createdAt.toISOString() ?? null,
          links: regionLinks(h.region),
        })),
      };
    },
  );

  r.get(
    '/v1/regions/:region/summary',
    {
      preValidation: auth,
      schema: {
        summary: "A region's summary: stratified estimates with intervals, guilds, disturbance classes, species, fits",
        description:
          'JSON by default; CSV (the `export regions` rows) with `?format=csv` or `Accept: text/csv`. The latest snapshot unless `?version=N`. ' +
          'Sends an ETag; a request with a matching If-None-Match gets 304 Not Modified.',
        tags: ['regions'],
        security,
        params: RegionParams,
        querystring: SummaryQuery,
        response: {
          200: SummaryResponse.describe('the summary (JSON; text/csv when CSV was asked for)'),
          304: ErrorBody.describe('Not Modified (empty body)'),
          401: ErrorBody,
          403: ErrorBody,
          404: ErrorBody,
        },
      },
    },
    async (request, reply) => {
      const { region } = request.params;
      if (!(await checkRegion(ctx, request, reply, region))) return reply;
      const entry = await ctx.cache.get(region, request.query.version);
      if (!entry) {
        const what = request.query.version ? `version ${request.query.version} of the summary of '${region}' does not exist` : `no summary of '${region}' yet: it is assembled by the next recompute`;
        return denyJson(reply, 404, 'not_found', what);
      }
      return sendSummary(request, reply, { name: region, etag: entry.snapshot.etag, version: entry.snapshot.version, json: entry.json, csv: entry.csv });
    },
  );

  r.get(
    '/v1/regions/:region/versions',
    {
      preValidation: auth,
      schema: {
        summary: "Every stored version of a region's summary, newest first",
        tags: ['regions'],
        security,
        params: RegionParams,
        response: { 200: VersionList, 401: ErrorBody, 403: ErrorBody, 404: ErrorBody },
      },
    },
    async (request, reply) => {
      const { region } = request.params;
      if (!(await checkRegion(ctx, request, reply, region))) return reply;
      const versions = await listSummaryVersions(ctx.deps.db, region);
      return { region, versions: versions.map((v) => ({ version: v.version, etag: v.etag, created_at: v.createdAt.toISOString() })) };
    },
  );

  r.get(
    '/v1/regions/:region/plots',
    {
      preValidation: auth,
      schema: {
        summary: "A region's plots with their metrics (GeoJSON)",
        tags: ['regions'],
        security,
        params: RegionParams,
        response: { 200: GeoJsonCollection, 401: ErrorBody, 403: ErrorBody, 404: ErrorBody },
      },
    },
    async (request, reply) => {
      const { region } = request.params;
      if (!(await checkRegion(ctx, request, reply, region))) return reply;
      return reply.type('application/geo+json; charset=utf-8').send((await regionPlotsGeoJson(ctx.deps.db, region)) as never);
    },
  );
}
