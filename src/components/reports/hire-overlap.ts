import type { DialogOptions } from 'naive-ui';
import { ApiError } from '@/api/client';

/**
 * The refusal that asks first: the days overlap another hire of the machine (409 `hire-overlap`).
 * Sent again with `alsoOverlapping`, the server saves it.
 */
export function overlapAsked(e: unknown): e is ApiError {
  return e instanceof ApiError && e.problem.code === 'hire-overlap';
}

/**
 * The question put to the manager, with the server's sentence naming the other hire: recording
 * (or changing) it anyway means paying for the machine twice over the days the hires share.
 *
 * @example dialog.warning(overlapQuestion(refusal, 'record', () => void record(body, true)))
 */
export function overlapQuestion(e: ApiError, what: 'record' | 'change', yes: () => void): DialogOptions {
  return {
    title: 'The machine is already on hire then',
    content: `${e.detail ?? e.title} ${what === 'record' ? 'Record this hire as well?' : 'Save these days as well?'}`,
    positiveText: what === 'record' ? 'Record it as well' : 'Save them as well',
    negativeText: 'Go back',
    onPositiveClick: yes,
  };
}
