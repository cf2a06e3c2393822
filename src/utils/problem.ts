import { ApiError, type FieldProblem } from '@/api/client';

export interface ProblemSummary {
  title: string;
  detail: string | undefined;
  fields: FieldProblem[];
}

/**
 * What to tell a person about a failure, whatever was thrown.
 * @example problemSummary(new ApiError({ status: 409, title: 'Crane already booked' })).title // 'Crane already booked'
 */
export function problemSummary(error: unknown): ProblemSummary {
  if (error instanceof ApiError) return { title: error.title, detail: error.detail, fields: error.errors };
  return {
    title: 'Something went wrong',
    detail: 'Try again; if it keeps happening, tell whoever runs Waterline for your firm.',
    fields: [],
  };
}

/** One line of text for a field problem: `reference: Required`, or just the message when no field is named. */
export function fieldProblemText(problem: FieldProblem): string {
  return problem.field ? `${problem.field}: ${problem.message}` : problem.message;
}
