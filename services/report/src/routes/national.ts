import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { listNationalVersions } from '@stemwise/db';
import { canSeeNational, type Principal } from '../access';
import { readNationalSnapshot } from '../national-snapshot';
import { nationalJson, summaryCsv } from '../representations';
import { denyJson, requireToken, type Deny, type RouteContext } from './auth';
import { NATIONAL_LINKS, sendSummary } from './regions';

export { NATIONAL_LINKS };
import { ErrorBody, NationalResponse, NationalVersionList, SummaryQuery } from './schemas';

/** 403 unless the token may see the national figures (they mix every region: admins only). */
export function checkNational(request: FastifyRequest, reply: FastifyReply, deny: Deny = denyJson): boolean {
  if (canSeeNational(request.principal as Principal)) return true;
  deny(reply, 403, 'forbidden', 'the national figures combine every region; they need an admin token (a reader token is limited to its regions)');
  return false;
}

export function nationalRoutes(app: FastifyInstance, ctx: RouteContext): void {
  const r = app.withTypeProvider<ZodTypeProvider>();
  const auth = requireToken(ctx, { cookie: true });
  const security = [{ bearer: [] }];

  r.get(
    '/v1/national/summary',
    {
      preValidation: auth,
      schema: {
        summary: 'All regions together: stratified by region × forest type, and each forest type nationally',
        description:
          'JSON by default; CSV (the `national` rows of `export regions`) with `?format=csv` or `Accept: text/csv`. The latest snapshot unless `?version=N`. ' +
          'Admin tokens only: the figures mix every region. Sends an ETag; a matching If-None-Match gets 304.',
        tags: ['national'],
        security,
        querystring: SummaryQuery,
        response: {
          200: NationalResponse.describe('the national summary (JSON; text/csv when CSV was asked for)'),
          304: ErrorBody.describe('Not Modified (empty body)'),
          401: ErrorBody,
          403: ErrorBody,
          404: ErrorBody,
        },
      },
    },
    async (request, reply) => {
      if (!checkNational(request, reply)) return reply;
      const s = await readNationalSnapshot(ctx.deps.db, request.query.version);
      if (!s) return denyJson(reply, 404, 'not_found', request.query.version ? `version ${request.query.version} of the national summary does not exist` : 'no national summary yet: it is assembled by the next recompute');
      return sendSummary(request, reply, { name: 'national', etag: s.etag, version: s.version, json: nationalJson(s), csv: summaryCsv(s) });
    },
  );

  r.get(
    '/v1/national/versions',
    {
      preValidation: auth,
      schema: { summary: 'Every stored version of the national summary, newest first', tags: ['national'], security, response: { 200: NationalVersionList, 401: ErrorBody, 403: ErrorBody } },
    },
    async (request, reply) => {
      if (!checkNational(request, reply)) return reply;
      const versions = await listNationalVersions(ctx.deps.db);
      return { versions: versions.map((v) => ({ version: v.version, etag: v.etag, created_at: v.createdAt.toISOString() })) };
    },
  );
}
