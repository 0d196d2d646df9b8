import type { Knex } from 'knex'
import * as m001 from '../../migrations/20261202_001_foundation'
import * as m002 from '../../migrations/20261202_002_outbox'
import * as m003 from '../../migrations/20261202_003_studies_rounds'
import * as m004 from '../../migrations/20261202_004_answers'
import * as m005 from '../../migrations/20261202_005_reconciliation'
import * as m006 from '../../migrations/20261202_006_pilot_impact'
import * as m007 from '../../migrations/20261202_007_records'
import * as m008 from '../../migrations/20261203_008_abuse_limits'
import * as m010 from '../../migrations/20261203_010_record_review'
import * as m016 from '../../migrations/20261203_016_record_integrity'
import * as roundTimeZone from '../../migrations/20261203_i17b_round_time_zone'
import * as m018 from '../../migrations/20261203_018_comparison_prior'
import * as m022 from '../../migrations/20261203_022_compositions'
import * as m022b from '../../migrations/20261203_022b_composition_pilot'
import * as m022c from '../../migrations/20261203_022c_round_links'
import * as m022d from '../../migrations/20261203_022d_link_reconciliations'
import * as m024 from '../../migrations/20261203_024_impact_jobs'
import * as m024b from '../../migrations/20261203_024b_impact_job_cancel'
import * as m018b from '../../migrations/20261203_018b_expert_labels_numbered'

type Migration = { up(knex: Knex): Promise<void>; down(knex: Knex): Promise<void> }

// Listed by hand: knex cannot load .ts migrations from a folder under vitest.
const migrations: Record<string, Migration> = {
  '20261202_001_foundation': m001,
  '20261202_002_outbox': m002,
  '20261202_003_studies_rounds': m003,
  '20261202_004_answers': m004,
  '20261202_005_reconciliation': m005,
  '20261202_006_pilot_impact': m006,
  '20261202_007_records': m007,
  '20261203_008_abuse_limits': m008,
  '20261203_010_record_review': m010,
  '20261203_016_record_integrity': m016,
  '20261203_i17b_round_time_zone': roundTimeZone,
  '20261203_018_comparison_prior': m018,
  '20261203_022_compositions': m022,
  '20261203_022b_composition_pilot': m022b,
  '20261203_024_impact_jobs': m024,
  '20261203_018b_expert_labels_numbered': m018b,
  '20261203_022c_round_links': m022c,
  '20261203_022d_link_reconciliations': m022d,
  '20261203_024b_impact_job_cancel': m024b,
}

export const migrationSource: Knex.MigrationSource<string> = {
  getMigrations: async () => Object.keys(migrations),
  getMigrationName: (name) => name,
  getMigration: async (name) => migrations[name],
}
