import type { Knex } from 'knex';
import { reachOf, type Actor } from '../services/actor.ts';
import { ScopedModel, visibleJobIds, type AnyQuery } from './base.ts';
import type { InstallTemplate } from '../../shared/templates/types.ts';
import type { QuantitySettingsPatch, WaterTargetsPatch } from '../../shared/schemas/firm-settings.ts';
import type { EarthingArrangement } from '../../shared/quantities/supply.ts';

const knexOf = (q: AnyQuery): Knex => q.modelClass().knex();

/** The site survey of a job: visible to whoever sees the job. */
export class Survey extends ScopedModel {
  static override tableName = 'surveys';
  id!: string;
  jobId!: string;
  accessWidthMm!: number;
  accessHeightMm!: number | null;
  steps!: number;
  gates!: number;
  overheadObstructions!: boolean;
  overheadNotes!: string | null;
  groundType!: string;
  buriedServicesNotes!: string | null;
  craneStandingPosition!: string | null;
  /** Which way the unit faces (controls and service side); null until settled. */
  unitFacing!: string | null;
  craneDistanceToSetDownM!: number | null;
  consumerUnitDistanceM!: number | null;
  /** Where the consumer unit is, in the surveyor's words; null when not recorded. */
  consumerUnitLocation!: string | null;
  mainFuseAmps!: number | null;
  drainage!: string | null;
  craneRequired!: boolean | null;
  excavatorSize!: '1.5t' | '3t' | '5t' | null;
  evChargerAmps!: number | null;
  electricShowerAmps!: number | null;
  heatPumpAmps!: number | null;
  otherLargeLoadAmps!: number | null;
  otherLargeLoadNotes!: string | null;
  earthingArrangement!: EarthingArrangement | null;
  hoseFlowLitresPerMinute!: number | null;
  /** Where the site is (WGS84 degrees), for its weather forecast; null when not recorded. */
  siteLatitude!: number | null;
  siteLongitude!: number | null;
  notes!: string | null;
  surveyedBy!: string | null;
  surveyedAt!: Date;
  version!: number;
  updatedAt!: Date;
  static override scope(q: AnyQuery, actor: Actor) {
    q.whereIn('surveys.job_id', visibleJobIds(knexOf(q), actor));
  }
}

/** A firm's edited stage template; only the installer office reads and edits its own. */
export class StageTemplateRow extends ScopedModel {
  static override tableName = 'stage_templates';
  static override jsonAttributes = ['stages', 'links'];
  id!: string;
  firmId!: string;
  installationType!: InstallTemplate['installationType'];
  name!: string;
  stages!: InstallTemplate['stages'];
  links!: InstallTemplate['links'];
  version!: number;
  updatedBy!: string | null;
  updatedAt!: Date;
  static override scope(q: AnyQuery, actor: Actor) {
    if (reachOf(actor) === 'installer-office') q.where('stage_templates.firm_id', actor.firmId);
    else q.whereRaw('false');
  }
}

/** A firm's own quantity figures over the defaults. */
export class FirmSettings extends ScopedModel {
  static override tableName = 'firm_settings';
  static override idColumn = 'firm_id';
  static override jsonAttributes = ['quantities', 'waterTargets'];
  firmId!: string;
  quantities!: QuantitySettingsPatch;
  /** The firm's own commissioning water ranges over the usual figures (water-balance.ts). */
  waterTargets!: WaterTargetsPatch;
  /** Keep EXIF location in stored photo originals (off: it is removed on upload). */
  keepPhotoLocation!: boolean;
  /** Partners booked on a job see the householder's name and phone (read-policy.ts); off by default. */
  shareCustomerContactWithPartners!: boolean;
  /** The firm's concrete's Nurse–Saul datum, °C (ASTM C1074's working default 0 °C unless changed). */
  cureDatumC!: number;
  /** The deposit asked for by default, % of the job's price (25 unless the firm set its own). */
  depositPercent!: number;
  version!: number;
  updatedAt!: Date;
  static override scope(q: AnyQuery, actor: Actor) {
    q.where('firm_settings.firm_id', actor.firmId);
  }
}

/** A photo or document kept on a job. */
export class JobFile extends ScopedModel {
  static override tableName = 'job_files';
  id!: string;
  jobId!: string;
  objectKey!: string;
  thumbnailKey!: string | null;
  name!: string;
  contentType!: string;
  sizeBytes!: number;
  uploadedBy!: string | null;
  createdAt!: Date;
  static override scope(q: AnyQuery, actor: Actor) {
    q.whereIn('job_files.job_id', visibleJobIds(knexOf(q), actor));
  }
}

/** This module's scoped models, for the test that checks each declares its scope. */
export const JOB_RECORD_MODELS = [Survey, StageTemplateRow, FirmSettings, JobFile] as const;
