import type { Knex } from 'knex';
import { Firm, HirePeriod } from '../models/index.ts';
import { loadBoard } from './board.ts';
import { withAnswers } from './answer-views.ts';
import { scoped } from './scope.ts';
import type { Actor } from './actor.ts';
import { reportContext, type ReportContext } from '../../shared/reports/context.ts';
import { clashReport } from '../../shared/reports/clashes.ts';
import { hireReport, type HirePeriodFacts } from '../../shared/reports/hire.ts';
import { utilisationReport } from '../../shared/reports/utilisation.ts';
import { absoluteLink, poundsCell, toCsv } from '../../shared/reports/csv.ts';
import type { ClashReport, HireReport, UtilisationReport } from '../../shared/reports/types.ts';

export interface ReportSpan {
  from: number;
  to: number;
}

const hours = (minutes: number) => (minutes / 60).toFixed(2);
const percent = (ratio: number) => (ratio * 100).toFixed(1);

/**
 * The manager's reports: the scoped board from {@link loadBoard} (another installer's bookings of
 * a shared partner resource arrive anonymous), analysed by the same engine as the board.
 */
export class ReportsService {
  /** `publicUrl`: the site's own address (PUBLIC_URL), so CSV links open from a spreadsheet. */
  constructor(
    private readonly knex: Knex,
    private readonly now: () => number,
    private readonly publicUrl = 'http://127.0.0.1:3000',
    private readonly extraWorkingMinutes?: number,
  ) {}

  private link(relative: string): string {
    return absoluteLink(relative, this.publicUrl);
  }

  private async context(
    actor: Actor,
    span: ReportSpan,
    load: ReportSpan = span,
    criticalPath = true,
  ): Promise<ReportContext> {
    const [firm, data] = await Promise.all([
      scoped(Firm, actor).findById(actor.firmId),
      loadBoard(this.knex, actor, { from: load.from, to: load.to, now: this.now() }),
    ]);
    return reportContext(
      data,
      { ...span, now: this.now(), timeZone: firm?.timeZone ?? 'Europe/London' },
      { criticalPath },
    );
  }

  async clashes(actor: Actor, span: ReportSpan): Promise<ClashReport> {
    return clashReport(await this.context(actor, span), { extraWorkingMinutes: this.extraWorkingMinutes });
  }

  async hire(actor: Actor, span: ReportSpan): Promise<HireReport> {
    const rows = (await scoped(HirePeriod, actor)
      .join('firms', 'firms.id', 'hire_periods.supplier_firm_id')
      .where('hire_periods.off_hire_at', '>', new Date(span.from))
      .where('hire_periods.on_hire_at', '<', new Date(span.to))
      .select('hire_periods.*', 'firms.name as supplierName')) as unknown as (HirePeriod & {
      version: number;
      supplierName: string;
    })[];
    const facts = new Map<string, HirePeriodFacts>(
      rows.map((h) => [
        String(h.id),
        {
          id: String(h.id),
          supplierFirmId: String(h.supplierFirmId),
          supplierName: h.supplierName,
          status: h.status,
          version: h.version,
          deliveryPence: h.deliveryPence,
          collectionPence: h.collectionPence,
        },
      ]),
    );
    // Idle days count over the whole hire, so the board is loaded over every hire touching the range.
    const load = {
      from: Math.min(span.from, ...rows.map((h) => h.onHireAt.getTime())),
      to: Math.max(span.to, ...rows.map((h) => h.offHireAt.getTime())),
    };
    return hireReport(await this.context(actor, span, load, false), facts);
  }

  async utilisation(actor: Actor, span: ReportSpan): Promise<UtilisationReport> {
    const ctx = await this.context(actor, span);
    const sent = ctx.data.bookings
      .filter((b) => !b.elsewhere && b.state === 'sent')
      .map((b) => ({ id: b.id, version: b.version ?? 1, state: b.state }));
    const answered = await withAnswers(this.knex, sent);
    return utilisationReport(ctx, new Set(answered.filter((b) => b.overdue).map((b) => b.id)));
  }

  async clashesCsv(actor: Actor, span: ReportSpan): Promise<string> {
    const report = await this.clashes(actor, span);
    return toCsv(report.rows, [
      { header: 'Date', value: (r) => r.date },
      { header: 'Problem', value: (r) => r.kindLabel },
      { header: 'Resources', value: (r) => r.resourceNames.join('; ') },
      { header: 'Jobs', value: (r) => r.jobReferences.join('; ') },
      { header: 'Stage to move', value: (r) => r.stageName },
      { header: 'What the check says', value: (r) => r.message },
      { header: 'Cost as booked (£)', value: (r) => poundsCell(r.costPence) },
      { header: 'Suggested fixes', value: (r) => r.fixes.map((f) => f.label).join('\n') },
      { header: 'Board link', value: (r) => this.link(r.link) },
    ]);
  }

  async hireCsv(actor: Actor, span: ReportSpan): Promise<string> {
    const report = await this.hire(actor, span);
    return toCsv(report.periods, [
      { header: 'Machine', value: (r) => r.resourceName },
      { header: 'Supplier', value: (r) => r.supplierName },
      { header: 'Status', value: (r) => r.status },
      { header: 'On hire', value: (r) => r.onHireDate },
      { header: 'Off hire', value: (r) => r.offHireDate },
      { header: 'Day rate (£)', value: (r) => poundsCell(r.dayRatePence) },
      { header: 'Paid days', value: (r) => r.paidDays },
      { header: 'Booked days', value: (r) => r.bookedDays },
      { header: 'Idle days', value: (r) => r.idleDays.length },
      { header: 'Idle dates', value: (r) => r.idleDays.join('; ') },
      { header: 'Idle cost (£)', value: (r) => poundsCell(r.idleCostPence) },
      { header: 'Delivery (£)', value: (r) => poundsCell(r.deliveryPence) },
      { header: 'Collection (£)', value: (r) => poundsCell(r.collectionPence) },
      { header: 'Total cost (£)', value: (r) => poundsCell(r.totalCostPence) },
      { header: 'Bookings outside the hire', value: (r) => r.bookingsOutsideHire },
      { header: 'Suggestions', value: (r) => r.suggestions.map((s) => s.label).join('\n') },
      { header: 'Board link', value: (r) => this.link(r.link) },
    ]);
  }

  /**
   * One row per resource and week, nothing else: a spreadsheet can sum, filter and pivot it
   * without a total row being counted twice. The totals are utilisation-summary.csv.
   */
  async utilisationCsv(actor: Actor, span: ReportSpan): Promise<string> {
    const report = await this.utilisation(actor, span);
    const rows = report.resources.flatMap((r) => r.weeks.map((w) => ({ r, w })));
    return toCsv(rows, [
      { header: 'Resource', value: (x) => x.r.resourceName },
      { header: 'Firm', value: (x) => x.r.firmName },
      { header: 'Group', value: (x) => x.r.group },
      { header: 'Week from', value: (x) => x.w.week },
      { header: 'Available hours', value: (x) => hours(x.w.availableMinutes) },
      { header: 'Booked hours', value: (x) => hours(x.w.bookedMinutes) },
      { header: 'Booked %', value: (x) => percent(x.w.ratio) },
    ]);
  }

  /** One row per resource over the whole span (its own file: see utilisationCsv), with its board link. */
  async utilisationSummaryCsv(actor: Actor, span: ReportSpan): Promise<string> {
    const report = await this.utilisation(actor, span);
    return toCsv(report.resources, [
      { header: 'Resource', value: (r) => r.resourceName },
      { header: 'Firm', value: (r) => r.firmName },
      { header: 'Group', value: (r) => r.group },
      { header: 'Available hours', value: (r) => hours(r.availableMinutes) },
      { header: 'Booked hours', value: (r) => hours(r.bookedMinutes) },
      { header: 'Booked %', value: (r) => percent(r.ratio) },
      { header: 'Busy elsewhere hours', value: (r) => hours(r.elsewhereMinutes) },
      { header: 'Board link', value: (r) => this.link(r.link) },
    ]);
  }

  async risksCsv(actor: Actor, span: ReportSpan): Promise<string> {
    const report = await this.utilisation(actor, span);
    return toCsv(report.risks, [
      { header: 'Job', value: (r) => r.reference },
      { header: 'Customer', value: (r) => r.customerName },
      { header: 'Town', value: (r) => r.siteTown },
      { header: 'Promised by', value: (r) => r.promisedDate ?? '' },
      { header: 'Days late', value: (r) => Math.ceil(r.lateByMs / 86_400_000) },
      { header: 'Status', value: (r) => r.statusLabel },
      { header: 'Float (working hours)', value: (r) => hours(r.floatMinutes) },
      { header: 'Why', value: (r) => r.reasons.map((x) => x.label).join('\n') },
      { header: 'Board link', value: (r) => this.link(r.link) },
    ]);
  }
}
