import type { InstallTemplate } from '@shared/templates/types';
import { kindLabel } from '@/components/board/board-events';
import { fieldSentence } from '@/utils/problem';

/** One field's problem, as the template schema (client) or the API's problem+json (server) names it. */
export interface FieldIssue {
  /** A dotted path into the template sent: `stages.1.duration.minutes`, `links.3.lagAmount`. */
  field: string;
  message: string;
}

/** What a path inside one stage is, in the owner's words (the stage is named before it). */
function stageField(stage: InstallTemplate['stages'][number] | undefined, rest: string[]): string {
  const [first, second, third] = rest;
  if (first === 'name') return 'the name';
  if (first === 'duration') return 'the minutes of work';
  if (first === 'requirements' && third === 'count') {
    const kind = stage?.requirements[Number(second)]?.kind;
    return kind ? `the ${kindLabel(kind)} count` : 'the count needed';
  }
  if (first === 'cure') return 'the cure strength';
  if (first === 'leadTime') return 'the notice';
  return 'this';
}

/**
 * A template's problems in the owner's words, each naming the stage or gap it is about, for the
 * list by the Save button (not "stages.1.duration.minutes: Too small").
 *
 * @example
 * templateProblems(template, [{ field: 'stages.1.duration.minutes', message: 'must be at least 15 minutes' }])
 * // ['Excavate pit: the minutes of work must be at least 15 minutes']
 */
export function templateProblems(
  template: Pick<InstallTemplate, 'stages' | 'links'>,
  issues: readonly FieldIssue[],
): string[] {
  // A stage is named by its name, or where that is empty by its place ("Stage 1"), as the table shows it.
  const labelAt = (i: number) => template.stages[i]?.name || `Stage ${i + 1}`;
  const nameOf = (kind: string) => {
    const i = template.stages.findIndex((s) => s.kind === kind);
    return i < 0 ? kindLabel(kind) : labelAt(i);
  };
  return issues.map(({ field, message }) => {
    const [head, at, ...rest] = field.split('.');
    if (head === 'name') return fieldSentence('The template name', message) as string;
    if (head === 'stages' && at !== undefined) {
      return `${labelAt(Number(at))}: ${fieldSentence(stageField(template.stages[Number(at)], rest), message)}`;
    }
    if (head === 'links' && at !== undefined) {
      const link = template.links[Number(at)];
      const label = link ? `${nameOf(link.to)} after ${nameOf(link.from)}` : `Gap ${Number(at) + 1}`;
      return `${label}: ${fieldSentence('the gap', message)}`;
    }
    return fieldSentence(head === 'stages' ? 'The template' : field, message) as string;
  });
}
