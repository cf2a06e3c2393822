import type { Knex } from 'knex';
import { DEFAULT_TEMPLATES } from '../../shared/templates/defaults.ts';
import { templateProblems } from '../../shared/templates/plan.ts';
import type { InstallTemplate, InstallationType } from '../../shared/templates/types.ts';
import {
  DEFAULT_QUANTITY_SETTINGS,
  SETTING_SOURCES,
  settingsWith,
  type QuantitySettings,
} from '../../shared/quantities/settings.ts';
import type { PutTemplate } from '../../shared/schemas/templates.ts';
import type { PutFirmSettings } from '../../shared/schemas/firm-settings.ts';
import { INSTALLATION_TYPES } from '../../shared/schemas/jobs.ts';
import { FirmSettings, StageTemplateRow } from '../models/job-records.ts';
import { DATUM_C } from '../../shared/scheduler/index.ts';
import { BadRequestError, ConflictError } from '../errors.ts';
import type { Actor } from './actor.ts';
import { scoped } from './scope.ts';
import { recordChange } from './audit.ts';
import { DEFAULT_DEPOSIT_PERCENT } from './payments.ts';
import { may } from '../../shared/permissions.ts';
import { DEFAULT_WATER_TARGETS, waterTargetsOf, type WaterTargets } from '../../shared/water-balance.ts';

export interface TemplateView extends InstallTemplate {
  version: number;
  isDefault: boolean;
  updatedAt: string | null;
}

function toView(row: StageTemplateRow | undefined, type: InstallationType): TemplateView {
  if (!row) return { ...structuredClone(DEFAULT_TEMPLATES[type]), version: 0, isDefault: true, updatedAt: null };
  return {
    installationType: type,
    name: row.name,
    stages: row.stages,
    links: row.links,
    version: row.version,
    isDefault: false,
    updatedAt: row.updatedAt.toISOString(),
  };
}

export interface SettingsView {
  quantities: QuantitySettings;
  overrides: Partial<QuantitySettings>;
  defaults: QuantitySettings;
  sources: typeof SETTING_SOURCES;
  version: number;
  /** Whether stored photo originals keep where they were taken (EXIF GPS). */
  keepPhotoLocation: boolean;
  /** Whether partner firms booked on a job see the householder's name and phone (read-policy.ts). */
  shareCustomerContactWithPartners: boolean;
  /** The Nurse–Saul datum (°C) the cure from the site's weather counts above (cure.ts; 0 °C by default). */
  cureDatumC: number;
  /** The firm's target ranges for the commissioning readings: its own where set, the usual figures otherwise. */
  waterTargets: WaterTargets;
  /** The usual figures (common practice, no source), to compare and go back to. */
  waterTargetDefaults: WaterTargets;
  /** The deposit asked for by default, % of the price: for those who see money (`payments:read`) only. */
  depositPercent?: number;
}

/** A firm's stage templates (its own edits over the built-in defaults) and its quantity settings. */
export class TemplatesService {
  constructor(private readonly knex: Knex) {}

  async list(actor: Actor): Promise<TemplateView[]> {
    const rows = await scoped(StageTemplateRow, actor);
    return INSTALLATION_TYPES.map((t) =>
      toView(
        rows.find((r) => r.installationType === t),
        t,
      ),
    );
  }

  async get(actor: Actor, type: InstallationType, trx?: Knex.Transaction): Promise<TemplateView> {
    return toView(await scoped(StageTemplateRow, actor, trx).findOne({ installationType: type }), type);
  }

  /** Saves the firm's template; a change based on an old version is refused (409). */
  async put(actor: Actor, type: InstallationType, input: PutTemplate): Promise<TemplateView> {
    const template: InstallTemplate = {
      installationType: type,
      name: input.name,
      stages: input.stages,
      links: input.links,
    };
    const problems = templateProblems(template);
    if (problems.length)
      throw new BadRequestError(
        'The template does not hold together.',
        problems.map((p) => ({ field: p.split(':')[0] ?? '(body)', message: p })),
      );
    return this.knex.transaction(async (trx) => {
      const before = await scoped(StageTemplateRow, actor, trx).findOne({ installationType: type }).forUpdate();
      const current = before?.version ?? 0;
      if (current !== input.version) {
        throw new ConflictError('Someone else changed this template since you loaded it.', {
          code: 'stale-version',
          current: toView(before, type),
        });
      }
      const values = {
        name: input.name,
        stages: input.stages,
        links: input.links,
        updatedBy: actor.userId,
        updatedAt: new Date(),
      };
      const after = before
        ? await StageTemplateRow.query(trx).patchAndFetchById(before.id, {
            ...values,
            version: current + 1,
          } as Partial<StageTemplateRow>)
        : await StageTemplateRow.query(trx).insertAndFetch({
            ...values,
            firmId: actor.firmId,
            installationType: type,
            version: 1,
          } as Partial<StageTemplateRow>);
      await recordChange(trx, actor, 'stage_template', after.id, before ? 'update' : 'create', before ?? null, after);
      return toView(after, type);
    });
  }

  async settings(actor: Actor, trx?: Knex.Transaction): Promise<SettingsView> {
    const row = await scoped(FirmSettings, actor, trx).first();
    const overrides = (row?.quantities ?? {}) as Partial<QuantitySettings>;
    return {
      quantities: settingsWith(overrides),
      overrides,
      defaults: DEFAULT_QUANTITY_SETTINGS,
      sources: SETTING_SOURCES,
      version: row?.version ?? 0,
      keepPhotoLocation: row?.keepPhotoLocation ?? false,
      shareCustomerContactWithPartners: row?.shareCustomerContactWithPartners ?? false,
      cureDatumC: row?.cureDatumC ?? DATUM_C,
      waterTargets: waterTargetsOf(row?.waterTargets),
      waterTargetDefaults: DEFAULT_WATER_TARGETS,
      ...(may(actor.role, 'payments:read') ? { depositPercent: row?.depositPercent ?? DEFAULT_DEPOSIT_PERCENT } : {}),
    };
  }

  /**
   * Replaces the firm's quantity overrides (left-out figures fall back to the defaults) and/or sets
   * the photo and partner-sharing switches. Only a quantities change moves the version (see PutFirmSettings).
   */
  async putSettings(actor: Actor, input: PutFirmSettings): Promise<SettingsView> {
    return this.knex.transaction(async (trx) => {
      const before = await scoped(FirmSettings, actor, trx).first().forUpdate();
      const current = before?.version ?? 0;
      if (input.version !== undefined && current !== input.version) {
        throw new ConflictError('Someone else changed these settings since you loaded them.', {
          code: 'stale-version',
          current: await this.settings(actor, trx),
        });
      }
      if (
        input.waterTargets !== undefined &&
        JSON.stringify(waterTargetsOf(before?.waterTargets)) !== JSON.stringify(waterTargetsOf(input.waterTargetsWas))
      ) {
        throw new ConflictError('Someone else changed the water targets since you loaded them: reload to see theirs.', {
          code: 'stale-version',
          current: await this.settings(actor, trx),
        });
      }
      const depositWas = before?.depositPercent ?? DEFAULT_DEPOSIT_PERCENT;
      const datumWas = before?.cureDatumC ?? DATUM_C;
      // A value someone else changed since the form loaded it is not typed over, unless it is
      // already what this save asks for (a repeated save changes nothing).
      if (
        input.depositPercent !== undefined &&
        input.depositPercentWas !== depositWas &&
        input.depositPercent !== depositWas
      ) {
        throw new ConflictError(
          `Someone else set the deposit to ${depositWas} % since you loaded it: reload to see it before changing it.`,
          { code: 'stale-version', field: 'depositPercentWas', current: await this.settings(actor, trx) },
        );
      }
      if (input.cureDatumC !== undefined && input.cureDatumCWas !== datumWas && input.cureDatumC !== datumWas) {
        throw new ConflictError(
          `Someone else set the cure datum to ${datumWas} °C since you loaded it: reload to see it before changing it.`,
          { code: 'stale-version', field: 'cureDatumCWas', current: await this.settings(actor, trx) },
        );
      }
      const was = {
        quantities: before?.quantities ?? {},
        keepPhotoLocation: before?.keepPhotoLocation ?? false,
        shareCustomerContactWithPartners: before?.shareCustomerContactWithPartners ?? false,
        cureDatumC: datumWas,
        depositPercent: depositWas,
        waterTargets: before?.waterTargets ?? {},
      };
      const now = {
        quantities: input.quantities ?? was.quantities,
        keepPhotoLocation: input.keepPhotoLocation ?? was.keepPhotoLocation,
        shareCustomerContactWithPartners:
          input.shareCustomerContactWithPartners ?? was.shareCustomerContactWithPartners,
        cureDatumC: input.cureDatumC ?? was.cureDatumC,
        depositPercent: input.depositPercent ?? was.depositPercent,
        waterTargets: input.waterTargets ?? was.waterTargets,
        version: input.quantities ? current + 1 : current,
      };
      if (before) {
        await FirmSettings.query(trx)
          .patch({ ...now, updatedAt: new Date() } as Partial<FirmSettings>)
          .where('firm_id', actor.firmId);
      } else {
        await FirmSettings.query(trx).insert({ firmId: actor.firmId, ...now } as Partial<FirmSettings>);
      }
      await recordChange(trx, actor, 'firm_settings', actor.firmId, before ? 'update' : 'create', before ? was : null, {
        quantities: now.quantities,
        keepPhotoLocation: now.keepPhotoLocation,
        shareCustomerContactWithPartners: now.shareCustomerContactWithPartners,
        cureDatumC: now.cureDatumC,
        depositPercent: now.depositPercent,
        waterTargets: now.waterTargets,
      });
      return this.settings(actor, trx);
    });
  }
}
