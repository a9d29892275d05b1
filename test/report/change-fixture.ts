import { PLOT_CHANGE_DB_COLUMNS, type Db, type PlotChangeDbColumn } from '@stemwise/db';
import { seedBatch } from './fixture';

// Change between visits inserted directly with SQL (no compute): each named plot gets an earlier visit
// and a plot_change row from it to the plot's latest visit, with the values given (others 0, counts 10).

export interface FixturePair {
  plotKey: string;
  dateFrom: string;
  years: number;
  values: Partial<Record<PlotChangeDbColumn, number | null>>;
}

/** The parts of net biomass change given, and the net and carbon change that follow from them (CF 0.47). */
export function budget(growth: number, recruitment: number, died: number, removed: number): Partial<Record<PlotChangeDbColumn, number>> {
  const net = growth + recruitment - died - removed;
  return {
    agb_growth_mg_ha_yr: growth,
    agb_recruitment_mg_ha_yr: recruitment,
    agb_died_mg_ha_yr: died,
    agb_removed_mg_ha_yr: removed,
    agb_loss_mg_ha_yr: died + removed,
    agb_net_change_mg_ha_yr: net,
    carbon_net_change_mg_ha_yr: 0.47 * net,
  };
}

export async function seedChangePairs(db: Db, pairs: readonly FixturePair[]): Promise<void> {
  const batch = await seedBatch(db);
  const names = PLOT_CHANGE_DB_COLUMNS.map(([c]) => c);
  await db.transaction(async (tx) => {
    for (const p of pairs) {
      const [to] = await tx.query<{ plot_id: number; id: number }>(
        `select v.plot_id, v.id from plot_visits v join plots p on p.id = v.plot_id where p.plot_key = $1 order by v.survey_date desc limit 1`,
        [p.plotKey],
      );
      if (!to) throw new Error(`seedChangePairs: no plot ${p.plotKey}`);
      const [{ id: from }] = await tx.query<{ id: number }>(
        `insert into plot_visits (plot_id, survey_date, batch_id, area_ha, logging_class, fire_class, stale) values ($1, $2, $3, 0.1, 0, 0, false) returning id`,
        [to.plot_id, p.dateFrom, batch],
      );
      const values: Record<string, number | null> = { n_start: 10, n_survivors: 10, n_died: 0, n_removed: 0, n_recruits: 0, n_absent: 0, dbh_threshold_cm: 10, years: p.years };
      const row = names.map((c) => (c in p.values ? (p.values[c] ?? null) : (values[c] ?? 0)));
      await tx.query(
        `insert into plot_change (plot_id, visit_from_id, visit_to_id, ${names.join(', ')}) values ($1, $2, $3, ${names.map((_, i) => `$${i + 4}`).join(', ')})`,
        [to.plot_id, from, to.id, ...row],
      );
    }
  });
}
