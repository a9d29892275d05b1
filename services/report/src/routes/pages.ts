import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { IPCC_2006_CARBON_FRACTION } from '@stemwise/core';
import { listNationalVersions, listRegionHeads, listRegionProblems, listSummaryVersions, problemView } from '@stemwise/db';
import { canSeeNational, readsRegions, type Principal } from '../access';
import { readNationalSnapshot } from '../national-snapshot';
import { renderIndexPage } from '../page/index-page';
import { renderMessagePage } from '../page/message-page';
import { renderNationalPage } from '../page/national-page';
import { renderRegionPage } from '../page/region-page';
import { PAGE_HEADERS } from '../page/shell';
import { checkToken, requireToken, routeOf, TOKEN_COOKIE, type Deny, type RouteContext } from './auth';
import { checkNational, NATIONAL_LINKS } from './national';
import { checkRegion, regionLinks, visibleRegions } from './regions';
import { RegionParams, VersionNumber } from './schemas';
import { mapOf, MapQuery, plotPageRoutes, regionPlotSections, RegionPageQuery } from './plot-pages';
import { readRegionPlots } from '../plot-map';
import { MAP_PARAM } from '../page/map-section';
import { readSummaryChanges } from '../what-changed';
import { drawnNationalSnapshot, drawnSnapshot } from '../chart-svgs';

const COOKIE_MAX_AGE_S = 30 * 24 * 3600;

const HINTS: Record<number, string> = {
  401: 'Open this address once with ?token=YOUR_TOKEN added (a token comes from `stemwise token create`); the browser then keeps it in a cookie for 30 days.',
  403: 'Ask an administrator for a token that covers this page.',
};

/** Errors of the pages as small HTML pages. */
export const denyHtml: Deny = (reply, status, code, message) => {
  const titles: Record<number, string> = { 401: 'Sign-in needed', 403: 'Not for this token', 404: 'Not found', 429: 'Too many attempts' };
  return reply
    .code(status)
    .headers(PAGE_HEADERS)
    .header('x-error', code)
    .type('text/html; charset=utf-8')
    .send(renderMessagePage(titles[status], message, HINTS[status]));
};

/** The session cookie (see TOKEN_COOKIE): Secure when the original request was https (`request.protocol` follows a trusted proxy's X-Forwarded-Proto). */
function tokenCookie(request: FastifyRequest, value: string, maxAgeS: number): string {
  return `${TOKEN_COOKIE}=${value}; HttpOnly; SameSite=Lax; Path=/; Max-Age=${maxAgeS}${request.protocol === 'https' ? '; Secure' : ''}`;
}

function sendPage(reply: FastifyReply, body: string): FastifyReply {
  return reply.headers(PAGE_HEADERS).type('text/html; charset=utf-8').send(body);
}

/**
 * `?token=…` on a page URL: the token is checked, stored in an HttpOnly cookie, and the browser is sent
 * to the same address without it (so it stays out of history, bookmarks and referrers).
 */
function tokenFromQuery(ctx: RouteContext) {
  return async (request: FastifyRequest, reply: FastifyReply) => {
    const url = new URL(request.url, 'http://local');
    const token = url.searchParams.get('token');
    if (token === null) return;
    const v = await checkToken(ctx, request, reply, token, denyHtml);
    if (!v) return reply;
    if (!v.ok) return denyHtml(reply, 401, 'unauthorized', v.reason === 'revoked' ? 'This token was revoked.' : 'This token is not valid.');
    ctx.audit.record({ actor: v.principal.tokenId, action: 'token.signin', target: routeOf(request), details: { client: request.ip } });
    url.searchParams.delete('token');
    return reply
      .code(303)
      .header('set-cookie', tokenCookie(request, encodeURIComponent(token), COOKIE_MAX_AGE_S))
      .header('cache-control', 'no-store')
      .redirect(url.pathname + url.search, 303);
  };
}

export function pageRoutes(app: FastifyInstance, ctx: RouteContext): void {
  const r = app.withTypeProvider<ZodTypeProvider>();
  const auth = requireToken(ctx, { cookie: true, deny: denyHtml });
  const preValidation = [tokenFromQuery(ctx), auth];

  r.get('/', { preValidation, schema: { hide: true, querystring: MapQuery } }, async (request, reply) => {
    const p = request.principal as Principal;
    if (!readsRegions(p)) return denyHtml(reply, 403, 'forbidden', 'This token may submit and follow batches only; the summaries need a reader or admin token.');
    const heads = visibleRegions(p, await listRegionHeads(ctx.deps.db));
    const entries = heads.map((h) => ({
      region: h.region,
      plots: h.plots,
      version: h.head?.version ?? null,
      updatedAt: h.head?.createdAt ?? null,
      href: h.head ? regionLinks(h.region).page : null,
    }));
    const national = canSeeNational(p) ? await readNationalSnapshot(ctx.deps.db) : null;
    const map = await mapOf(await readRegionPlots(ctx.deps.db, heads.map((h) => h.region)), request.query[MAP_PARAM], 'Plots of the regions listed', {});
    return sendPage(reply, renderIndexPage(entries, { carbonFraction: IPCC_2006_CARBON_FRACTION, signOut: '/signout', national: national && { snapshot: national, href: NATIONAL_LINKS.page }, map }));
  });

  r.get(
    '/national',
    { preValidation, schema: { hide: true, querystring: MapQuery.extend({ version: VersionNumber.optional() }) } },
    async (request, reply) => {
      if (!checkNational(request, reply, denyHtml)) return reply;
      const snapshot = await readNationalSnapshot(ctx.deps.db, request.query.version);
      if (!snapshot) {
        return denyHtml(reply, 404, 'not_found', request.query.version ? `Version ${request.query.version} of the national summary does not exist.` : 'No national summary yet: it is assembled by the next recompute.');
      }
      const v = snapshot.version;
      const regions = (await listRegionHeads(ctx.deps.db)).map((h) => h.region);
      const map = await mapOf(await readRegionPlots(ctx.deps.db, regions), request.query[MAP_PARAM], 'Plots of all regions', { version: request.query.version?.toString() });
      const body = renderNationalPage({
        map,
        snapshot: await drawnNationalSnapshot(snapshot, request.log),
        carbonFraction: IPCC_2006_CARBON_FRACTION,
        versions: await listNationalVersions(ctx.deps.db),
        links: {
          index: '/',
          summaryJson: `${NATIONAL_LINKS.summary}?version=${v}`,
          summaryCsv: `${NATIONAL_LINKS.summary}?format=csv&version=${v}`,
          versionPage: (n) => `${NATIONAL_LINKS.page}?version=${n}`,
          signOut: '/signout',
        },
      });
      return sendPage(reply, body);
    },
  );

  r.get(
    '/regions/:region',
    { preValidation, schema: { hide: true, params: RegionParams, querystring: RegionPageQuery } },
    async (request, reply) => {
      const { region } = request.params;
      if (!(await checkRegion(ctx, request, reply, region, denyHtml))) return reply;
      const entry = await ctx.cache.get(region, request.query.version);
      if (!entry) {
        return denyHtml(reply, 404, 'not_found', request.query.version ? `Version ${request.query.version} of this summary does not exist.` : `No summary of ${region} yet: it is assembled by the next recompute.`);
      }
      const links = regionLinks(region);
      const v = entry.snapshot.version;
      const versions = await listSummaryVersions(ctx.deps.db, region);
      const problems = (await listRegionProblems(ctx.deps.db, region, entry.snapshot.payload.summary.forest_types)).map(problemView);
      const changes = await readSummaryChanges(ctx.deps.db, region, v);
      const body = renderRegionPage({
        plots: await regionPlotSections(ctx, region, request.query),
        snapshot: await drawnSnapshot(entry.snapshot, request.log),
        versions,
        problems,
        changes,
        links: {
          index: '/',
          summaryJson: `${links.summary}?version=${v}`,
          summaryCsv: `${links.summary}?format=csv&version=${v}`,
          plotsGeoJson: links.plots,
          versionPage: (n) => `${links.page}?version=${n}`,
          signOut: '/signout',
        },
      });
      return sendPage(reply, body);
    },
  );

  plotPageRoutes(app, ctx, preValidation, sendPage, denyHtml);

  r.get('/signout', { schema: { hide: true } }, async (request, reply) => {
    return reply
      .header('set-cookie', tokenCookie(request, '', 0))
      .headers(PAGE_HEADERS)
      .type('text/html; charset=utf-8')
      .send(renderMessagePage('Signed out', 'The token was removed from this browser.', 'Open a page with ?token=YOUR_TOKEN to sign in again.'));
  });
}
