import { plural } from '../plural.ts';
import { DAY_MS, formatPence } from '../scheduler/index.ts';
import type { ClashReport, HireReport, UtilisationReport, WorstProblem } from './types.ts';

/**
 * "The three worst problems first": the worst of each kind — the soonest clash (costliest on
 * the day), the costliest idle hire, the latest job (then one that can't go ahead as booked) — so no one kind hides the others; when a
 * kind has none, the next worst of the others fill the place. Within a kind, clashes rank by
 * date then cost, idle hires by idle cost, late jobs by how late.
 *
 * @example
 * worstProblems(clashes, hire, utilisation).map((p) => p.source) // ['clash', 'idle_hire', 'late_job']
 */
export function worstProblems(
  clashes: ClashReport,
  hire: HireReport,
  utilisation: UtilisationReport,
  count = 3,
): WorstProblem[] {
  const clashList: WorstProblem[] = clashes.rows.map((c) => ({
    source: 'clash',
    title: `${c.kindLabel}: ${c.resourceNames.join(', ')}`,
    detail: `${c.message}${c.jobReferences.length ? ` (${c.jobReferences.join(', ')})` : ''}`,
    costPence: c.costPence,
    date: c.date,
    link: c.link,
    fixes: c.fixes.map((f) => f.label),
  }));
  const idleList: WorstProblem[] = hire.periods
    .filter((p) => p.idleCostPence > 0)
    .sort((a, b) => b.idleCostPence - a.idleCostPence || a.onHire - b.onHire)
    .map((p) => ({
      source: 'idle_hire',
      title: p.resourceName, // the card's tag already says "Idle hire"
      detail: `${p.idleDays.length} of ${p.paidDays} paid days with nothing booked: ${formatPence(p.idleCostPence)} at ${formatPence(p.dayRatePence)} a day`,
      costPence: p.idleCostPence,
      date: p.idleDays[0] ?? p.onHireDate,
      link: p.link,
      fixes: p.suggestions.map((s) => s.label),
    }));
  // Late jobs first, then jobs that can't go ahead as booked (short of a resource, out of order).
  const lateList: WorstProblem[] = utilisation.risks
    .filter((r) => r.status === 'late' || r.status === 'blocked')
    .map((r) => ({
      source: r.status === 'late' ? 'late_job' : 'blocked_job',
      title: `${r.status === 'late' ? 'Late' : "Can't go ahead as booked"}: ${r.reference}${r.siteTown ? `, ${r.siteTown}` : ''}`,
      detail: r.reasons.map((x) => x.label).join('; '),
      costPence: 0,
      date: r.promisedDate ?? '',
      link: r.link,
      fixes: [
        r.status === 'late'
          ? `${plural(Math.ceil(r.lateByMs / DAY_MS), 'day')} to win back: open the job on the board and let the slot finder offer earlier places`
          : 'Open the job on the board: book what the stage is short of, or put its stages back in order',
      ],
    }));
  const lists = [clashList, idleList, lateList];
  const out: WorstProblem[] = [];
  for (const l of lists) if (l[0] && out.length < count) out.push(l.shift() as WorstProblem);
  while (out.length < count && lists.some((l) => l.length > 0)) {
    for (const l of lists) if (l[0] && out.length < count) out.push(l.shift() as WorstProblem);
  }
  return out;
}
