import type { FastifyInstance, FastifyReply, FastifyRequest, preValidationHookHandler } from 'fastify';
import type { ZodTypeProvider } from 'fastify-type-provider-zod';
import { z } from 'zod';
import { mapSection, MAP_PARAM } from '../page/map-section';
import { DEFAULT_PLOT_SORT, plotTable, plotTableVariables, type PlotSort } from '../page/plot-table';
import { renderPlotPage } from '../page/plot-page';
import type { Markup } from '../page/html';
import { DEFAULT_MAP_VARIABLE, MAP_VARIABLES, plotMapSvg, plotPagePath, readRegionPlots, type RegionPlots } from '../plot-map';
import { readPlotPage } from '../plot-page-data';
import type { Deny, RouteContext } from './auth';
import { checkRegion, regionLinks } from './regions';
import { paramText, RegionParams, VersionNumber } from './schemas';

// The plot pages (/regions/:region/plots/:plotId), and the plot map and plot table of the other pages.

const variables = MAP_VARIABLES as [string, ...string[]];
/** The query of a page with a map: the map's variable. */
export const MapQuery = z.object({ [MAP_PARAM]: z.enum(variables).optional() });
/** The query of a region page: its version, the map's variable and the plot table's order. */
export const RegionPageQuery = MapQuery.extend({
  version: VersionNumber.optional(),
  sort: z.enum(['plot', 'forest_type', 'survey_date', ...variables]).optional(),
  dir: z.enum(['asc', 'desc']).optional(),
});
type RegionPageQuery = z.infer<typeof RegionPageQuery>;

const query = (q: Record<string, string | number | undefined>): string => {
  const s = new URLSearchParams(Object.entries(q).filter((e): e is [string, string | number] => e[1] !== undefined).map(([k, v]): [string, string] => [k, String(v)])).toString();
  return s ? `?${s}` : '';
};

/** A page's map of these plots, coloured by the chosen variable, each point linked to its plot page. */
export async function mapOf(groups: readonly RegionPlots[], chosen: string | undefined, what: string, keep: Record<string, string | undefined>): Promise<Markup> {
  const variable = chosen ?? DEFAULT_MAP_VARIABLE;
  const svg = await plotMapSvg(groups, variable, what, plotPagePath);
  return mapSection({ svg, variable, choices: MAP_VARIABLES, keep, what, linked: true });
}

/** The map and the sortable plot table of a region page. */
export async function regionPlotSections(ctx: RouteContext, region: string, q: RegionPageQuery): Promise<{ map: Markup; table: Markup }> {
  const groups = await readRegionPlots(ctx.deps.db, [region]);
  const version = q.version === undefined ? undefined : String(q.version);
  const sort: PlotSort = q.sort ? { key: q.sort, dir: q.dir ?? 'asc' } : DEFAULT_PLOT_SORT;
  const map = await mapOf(groups, q[MAP_PARAM], `Plots of ${region}`, { version, sort: q.sort, dir: q.dir });
  const page = regionLinks(region).page;
  const table = plotTable({
    plots: groups[0].plots,
    variables: plotTableVariables(q[MAP_PARAM] ?? null),
    sort,
    sortHref: (s) => `${page}${query({ version, [MAP_PARAM]: q[MAP_PARAM], sort: s.key, dir: s.dir })}#plot-table`,
    plotHref: (key) => plotPagePath(region, key),
  });
  return { map, table };
}

export function plotPageRoutes(
  app: FastifyInstance,
  ctx: RouteContext,
  preValidation: preValidationHookHandler[],
  send: (reply: FastifyReply, body: string) => FastifyReply,
  deny: Deny,
): void {
  const r = app.withTypeProvider<ZodTypeProvider>();
  r.get(
    '/regions/:region/plots/:plotId',
    { preValidation, schema: { hide: true, params: RegionParams.extend({ plotId: paramText(64).describe('plot_id as loaded from plots.csv') }) } },
    async (request: FastifyRequest<{ Params: { region: string; plotId: string } }>, reply) => {
      const { region, plotId } = request.params;
      if (!(await checkRegion(ctx, request, reply, region, deny))) return reply;
      const data = await readPlotPage(ctx.deps.db, region, plotId, ctx.deps.config.reportingDbhMinCm);
      if (!data) return deny(reply, 404, 'not_found', `Region ${region} has no plot ${plotId}.`);
      return send(reply, renderPlotPage(data, { index: '/', region: regionLinks(region).page, signOut: '/signout' }));
    },
  );
}
