import type { Knex } from 'knex';

/**
 * What the survey now records for the supply check and the fill: the large loads already on the house's
 * supply (amps; null when there is none), how the house is earthed, and the hose's measured flow.
 * All nullable, so surveys saved before keep their meaning ("not recorded").
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('surveys', (t) => {
    t.integer('ev_charger_amps');
    t.integer('electric_shower_amps');
    t.integer('heat_pump_amps');
    t.integer('other_large_load_amps');
    t.text('other_large_load_notes');
    t.text('earthing_arrangement').checkIn(['TN-C-S', 'TN-S', 'TT', 'unknown'], 'surveys_earthing_arrangement_check');
    t.decimal('hose_flow_litres_per_minute', 6, 2);
  });
  await knex.raw(`ALTER TABLE surveys
    ADD CONSTRAINT surveys_large_loads_positive CHECK (
      (ev_charger_amps IS NULL OR ev_charger_amps > 0) AND (electric_shower_amps IS NULL OR electric_shower_amps > 0)
      AND (heat_pump_amps IS NULL OR heat_pump_amps > 0) AND (other_large_load_amps IS NULL OR other_large_load_amps > 0)),
    ADD CONSTRAINT surveys_hose_flow_positive CHECK (hose_flow_litres_per_minute IS NULL OR hose_flow_litres_per_minute > 0)`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw(
    'ALTER TABLE surveys DROP CONSTRAINT surveys_hose_flow_positive, DROP CONSTRAINT surveys_large_loads_positive',
  );
  await knex.schema.alterTable('surveys', (t) => {
    t.dropColumn('hose_flow_litres_per_minute');
    t.dropColumn('earthing_arrangement');
    t.dropColumn('other_large_load_notes');
    t.dropColumn('other_large_load_amps');
    t.dropColumn('heat_pump_amps');
    t.dropColumn('electric_shower_amps');
    t.dropColumn('ev_charger_amps');
  });
}
