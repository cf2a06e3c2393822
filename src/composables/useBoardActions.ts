import { h, ref, shallowRef } from 'vue';
import { useRouter } from 'vue-router';
import { useMessage, useNotification } from 'naive-ui';
import { useNamedDialog } from '@/composables/useNamedDialog';
import { api } from '@/api/client';
import type { BoardBooking, BoardData } from '@shared/board-data';
import { bookingsOfStage, dependentStageIds } from '@shared/board-actions';
import { plural } from '@shared/plural';
import { nextState } from '@shared/booking-states';
import type { DependentChoice, StageCompletion } from '@shared/schemas/bookings';
import {
  addWorkingMinutes,
  formatInstant,
  resourceCalendarOf,
  type BoardIndex,
  type Booking,
} from '@shared/scheduler/index';
import { refusalOf, type Intent, type MoveIntent, type WriteResult } from '@/components/board/drop-actions';
import { dependentsChoice, DEFAULT_WITHIN_DAYS, type DependentsChoiceModel } from '@/components/board/move-options';
import type { HiddenBooking } from '@/components/board/board-search';
import type { DragProbe, DragVerdict } from './useDragCheck';

interface Deps {
  data: () => BoardData | null;
  index: () => BoardIndex | null;
  /** The engine's verdict on a drop, without the box by the pointer. */
  evaluate: (probe: DragProbe) => DragVerdict;
  evaluateSet: (stageId: string, own: Booking[], start: number) => DragVerdict;
  /** The verdict on one booking moving alone, its stage's others staying. */
  evaluateAlone: (probe: DragProbe) => DragVerdict;
  /** Alt was held at the drop: only the dragged booking moves. */
  alone: () => boolean;
  pointerOverTray: () => boolean;
  send: (intent: Intent) => Promise<WriteResult>;
  reload: () => Promise<void>;
  /** The bookings a refusal cites that the filters hide, named by job. */
  hiddenFor: (bookingIds: string[]) => HiddenBooking[];
  timeZone: () => string;
}

/** A move waiting for the scheduler to say which stages after it go too. */
export interface DependentsAsk {
  title: string;
  model: DependentsChoiceModel;
  /** Works the choices out again for another number of days. */
  recompute: (withinDays: number) => DependentsChoiceModel;
  resolve: (answer: { choice: DependentChoice; withinDays: number } | null) => void;
}

const HELD: readonly string[] = ['sent', 'confirmed'];

/**
 * What happens after a drop, a resize, a key press, a button or a chosen slot: the engine's verdict
 * first (a refusal snaps back with its reason, naming any job the filters hide), a confirmation
 * where a partner would be asked again or told, the choice of the stages after it, then the
 * server's check and save. Booking a stage offers the rest of its resources; declines and
 * proposals are answered from here.
 */
export function useBoardActions(deps: Deps) {
  const dialog = useNamedDialog();
  const message = useMessage();
  const notification = useNotification();
  const router = useRouter();

  /** The completion panel: what the stage just booked still needs, and the engine's proposal. */
  const completion = shallowRef<StageCompletion | null>(null);
  const completionBusy = ref(false);
  /** The dependents dialog, when a move waits for it. */
  const dependentsAsk = shallowRef<DependentsAsk | null>(null);
  /** The stage whose bookings are highlighted together. */
  const selectedStage = ref<string | null>(null);
  /** Bookings shown whatever the filters: a clash the scheduler asked to see. */
  const revealed = shallowRef<ReadonlySet<string>>(new Set());

  const ask = (title: string, content: string, buttons: { label: string; value: string; primary?: boolean }[]) =>
    new Promise<string | null>((resolve) => {
      const d = dialog.create({
        title,
        content,
        closable: true,
        maskClosable: false,
        onClose: () => resolve(null),
        onMaskClick: () => resolve(null),
        action: () =>
          h(
            'div',
            { class: 'dialog-actions' },
            buttons.map((b) =>
              h(
                'button',
                {
                  type: 'button',
                  class: ['dialog-button', b.primary ? 'dialog-button--primary' : ''],
                  autofocus: b.primary,
                  onClick: () => {
                    d.destroy();
                    resolve(b.value);
                  },
                },
                b.label,
              ),
            ),
          ),
      });
    });

  const booking = (id: string): BoardBooking | undefined => deps.data()?.bookings.find((b) => b.id === id);
  const stageName = (stageId: string) => deps.data()?.stages.find((s) => s.id === stageId)?.name ?? 'the stage';
  const resourceOf = (id: string) => deps.data()?.resources.find((r) => r.id === id);
  const when = (t: number) => formatInstant(t, deps.timeZone());

  /** Shows the bookings a refusal cites even where the filters hide them. */
  function reveal(ids: string[]): void {
    revealed.value = new Set([...revealed.value, ...ids]);
  }
  function hideRevealed(): void {
    revealed.value = new Set();
  }

  /**
   * A refusal in plain words. When it cites bookings the filters hide, it names their jobs, links
   * to each, and offers to show them on the board.
   */
  function explain(prefix: string, reason: string, cited: string[]): void {
    const hidden = deps.hiddenFor(cited);
    if (hidden.length === 0) {
      message.error(`${prefix}: ${reason}`, { duration: 8000, closable: true });
      return;
    }
    const jobs = [...new Map(hidden.map((x) => [x.jobId, x])).values()];
    const n = notification.error({
      title: prefix,
      content: () =>
        h('div', [
          h('p', { style: 'margin:0 0 0.4rem' }, reason),
          h('p', { style: 'margin:0' }, [
            `It is with ${plural(jobs.length, 'job')} the filters hide: `,
            ...jobs.flatMap((j, i) => [
              i ? ', ' : '',
              h(
                'a',
                {
                  href: `/jobs/${j.jobId}`,
                  onClick: (e: MouseEvent) => {
                    e.preventDefault();
                    void router.push(`/jobs/${j.jobId}`);
                  },
                },
                j.reference,
              ),
            ]),
            '.',
          ]),
        ]),
      action: () =>
        h(
          'button',
          {
            type: 'button',
            class: 'dialog-button dialog-button--primary',
            onClick: () => {
              reveal(hidden.map((x) => x.bookingId));
              n.destroy();
            },
          },
          'Show the clash',
        ),
      duration: 15000,
      closable: true,
    });
  }

  /** Sends a change and says how it went; a refusal is explained (and the board reloaded when stale). */
  async function submit(
    intent: Intent,
    label: string,
    onFail?: () => void,
    options: { quiet?: string[] } = {},
  ): Promise<WriteResult | null> {
    try {
      const result = await deps.send(intent);
      const asked = result.reasked?.length
        ? ` ${plural(result.reasked.length, 'partner')} asked again: ${result.reasked.map((r) => r.firmName).join(', ')}.`
        : '';
      // Warnings the next step answers anyway (a stage short of resources gets the completion panel) are not repeated.
      const warnings = result.warnings.filter((w) => !options.quiet?.includes(w.kind));
      if (warnings.length) {
        const more = warnings.length > 1 ? ` (and ${plural(warnings.length - 1, 'more warning')})` : '';
        message.warning(`Saved: ${label}. Note: ${warnings[0]!.message}${more}.${asked}`, { duration: 6000 });
      } else message.success(`Saved: ${label}.${asked}`);
      return result;
    } catch (error) {
      onFail?.();
      const refusal = refusalOf(error);
      if (refusal.kind === 'stale') await deps.reload();
      explain(
        `Not saved: ${label}`,
        refusal.message,
        refusal.violations.flatMap((v) => v.bookingIds),
      );
      return null;
    }
  }

  /** Asks which stages after a moved stage go with it; resolves null when the move is called off. */
  function chooseDependents(
    title: string,
    model: DependentsChoiceModel,
    recompute: (days: number) => DependentsChoiceModel,
  ) {
    return new Promise<{ choice: DependentChoice; withinDays: number } | null>((resolve) => {
      dependentsAsk.value = {
        title,
        model,
        recompute,
        resolve: (answer) => {
          dependentsAsk.value = null;
          resolve(answer);
        },
      };
    });
  }

  /** The stage's span start after a drop of one of its bookings (all its bookings move together). */
  function spanStartAfter(index: BoardIndex, probe: DragProbe, verdictStart: number): number {
    const own = bookingsOfStage(index, probe.stageId);
    if (!own.length || probe.oldStart === undefined) return verdictStart;
    return Math.min(...own.map((b) => b.start)) + (verdictStart - probe.oldStart);
  }

  /** The engine's verdict on one booking alone at a time and row, the rest of its stage staying. */
  function aloneVerdict(b: BoardBooking, start: number, resourceId: string, end?: number): DragVerdict {
    return deps.evaluateAlone({
      stageId: b.stageId,
      bookingId: b.id,
      start,
      resourceId,
      oldStart: b.start,
      oldResourceId: b.resourceId,
      ...(end !== undefined ? { end } : {}),
    });
  }

  /** The move dialog's verdict: the booking's stage to a time and row, or the booking alone. */
  function checkAt(bookingId: string | null, start: number, resourceId: string, alone = false): DragVerdict {
    const b = bookingId ? booking(bookingId) : undefined;
    if (!b) return { allowed: false, reasons: [], warnings: [], start, cited: [] };
    if (alone && b.state !== 'declined') return aloneVerdict(b, start, resourceId);
    return deps.evaluate({
      stageId: b.stageId,
      bookingId: b.id,
      start,
      oldStart: b.start,
      resourceId,
      oldResourceId: b.resourceId,
    });
  }

  /** The move dialog's move. */
  function moveTo(bookingId: string | null, start: number, resourceId: string, alone = false): Promise<boolean> {
    const b = bookingId ? booking(bookingId) : undefined;
    if (!b) return Promise.resolve(false);
    return moveStage(
      { stageId: b.stageId, bookingId: b.id, start, oldStart: b.start, resourceId, oldResourceId: b.resourceId },
      () => {},
      `move '${stageName(b.stageId)}'`,
      { alone },
    );
  }

  /** A booking alone changes time or row (Alt held, or a declined one dropped again). */
  async function moveOne(
    b: BoardBooking,
    probe: DragProbe,
    verdict: DragVerdict,
    label: string,
    revert: () => void,
  ): Promise<boolean> {
    const index = deps.index();
    const stage = deps.data()?.stages.find((s) => s.id === b.stageId);
    if (!index || !stage) {
      revert();
      return false;
    }
    const resourceId = probe.resourceId ?? b.resourceId;
    const end =
      probe.end ?? addWorkingMinutes(resourceCalendarOf(index, resourceId), verdict.start, stage.durationMinutes);
    return (
      (await submit(
        {
          kind: 'patch',
          bookingId: b.id,
          version: b.version ?? 1,
          start: verdict.start,
          end,
          ...(resourceId !== b.resourceId ? { resourceId } : {}),
        },
        label,
        revert,
      )) !== null
    );
  }

  /** A booked stage was dropped, resized or moved by keyboard; `alone` moves only the dragged booking (Alt held, or chosen). */
  async function moveStage(
    probe: DragProbe,
    revert: () => void,
    label: string,
    options: { alone?: boolean } = {},
  ): Promise<boolean> {
    // Dropped on the tray: the drag check takes it off the board when the button comes up.
    if (probe.bookingId && deps.pointerOverTray()) {
      revert();
      return false;
    }
    const data = deps.data();
    const index = deps.index();
    if (!data || !index) {
      revert();
      return false;
    }
    const dragged = probe.bookingId ? booking(probe.bookingId) : undefined;
    const own = data.bookings.filter((b) => b.stageId === probe.stageId && b.state !== 'declined' && !b.elsewhere);
    const alone = Boolean(dragged && dragged.state !== 'declined' && own.length > 1 && (options.alone ?? deps.alone()));
    const verdict =
      alone && dragged
        ? aloneVerdict(dragged, probe.start, probe.resourceId ?? dragged.resourceId, probe.end)
        : deps.evaluate(probe);
    if (!verdict.allowed) {
      revert();
      explain('Not moved', verdict.reasons[0] ?? 'that time breaks a rule', verdict.cited);
      return false;
    }
    if (dragged?.state === 'declined')
      return moveOne(dragged, probe, verdict, `rebook '${stageName(dragged.stageId)}'`, revert);
    if (alone && dragged) return moveOne(dragged, probe, verdict, `${label} (this booking only)`, revert);
    const partnerHeld = own.filter((b) => HELD.includes(b.state) && resourceOf(b.resourceId)?.ownership === 'partner');
    if (partnerHeld.length) {
      const firms = [...new Set(partnerHeld.map((b) => resourceOf(b.resourceId)?.firmName ?? 'the partner'))].join(
        ', ',
      );
      const ok = await ask(
        'Move a booking a partner has seen?',
        `This stage was already sent to or confirmed by ${firms}. Moving it asks them again.`,
        [
          { label: 'Move and ask again', value: 'yes', primary: true },
          { label: 'Keep it where it was', value: 'no' },
        ],
      );
      if (ok !== 'yes') {
        revert();
        return false;
      }
    }
    const spanStart = spanStartAfter(index, probe, verdict.start);
    const move = {
      stageId: probe.stageId,
      start: spanStart,
      ...(probe.end !== undefined ? { end: probe.end } : {}),
      ...(probe.resourceId && probe.resourceId !== probe.oldResourceId
        ? { resourceId: probe.resourceId, bookingId: probe.bookingId }
        : {}),
    };
    let dependents: DependentChoice = 'none';
    let withinDays = DEFAULT_WITHIN_DAYS;
    let askAgain: string[] = [];
    if (
      probe.end === undefined &&
      dependentStageIds(index, probe.stageId).some((id) => bookingsOfStage(index, id).length)
    ) {
      const model = dependentsChoice(data, index, move);
      if (model.dependents > 0) {
        const answer = await chooseDependents(
          `Move '${stageName(probe.stageId)}' to ${when(spanStart)}`,
          model,
          (days) => dependentsChoice(data, index, move, days),
        );
        if (!answer) {
          revert();
          return false;
        }
        dependents = answer.choice;
        withinDays = answer.withinDays;
        const chosen = dependentsChoice(data, index, move, withinDays).options.find((o) => o.choice === dependents);
        // The dialog listed them: these partners are asked again (the stage's own were agreed above).
        askAgain = (chosen?.partner ?? [])
          .filter((p) => !own.some((b) => b.id === p.bookingId))
          .map((p) => p.bookingId);
      }
    }
    const intent: MoveIntent = {
      kind: 'move',
      ...move,
      versions: Object.fromEntries(own.map((b) => [b.id, b.version ?? 1])),
      dependents,
      ...(dependents === 'within' ? { withinDays } : {}),
      ...(askAgain.length ? { askAgain } : {}),
    };
    return (await submit(intent, label, revert)) !== null;
  }

  /** Asks the server what else the stage needs at that time, and opens the panel when something is missing. */
  async function openCompletion(stageId: string, resourceId?: string, start?: number): Promise<void> {
    completionBusy.value = true;
    try {
      const found = await api.get<StageCompletion>(`/api/stages/${stageId}/completion`, {
        query: {
          ...(resourceId ? { resourceId } : {}),
          ...(start !== undefined ? { startsAt: new Date(start).toISOString() } : {}),
        },
      });
      completion.value = found.requirements.some((r) => r.proposed.length || r.short) ? found : null;
    } catch (error) {
      explain('The rest of the stage could not be worked out', refusalOf(error).message, []);
    } finally {
      completionBusy.value = false;
    }
  }

  /** The panel is put away; the stage stays in the tray while anything is missing. */
  function closeCompletion(): void {
    completion.value = null;
  }

  /** Books the resources chosen in the completion panel, in one go (the batch route). */
  async function applyCompletion(resourceIds: string[]): Promise<boolean> {
    const c = completion.value;
    if (!c || resourceIds.length === 0) {
      completion.value = null;
      return false;
    }
    const start = Date.parse(c.startsAt);
    const done = await submit(
      { kind: 'batch', bookings: resourceIds.map((resourceId) => ({ stageId: c.stageId, resourceId, start })) },
      `book the rest of '${c.stageName}' (${plural(resourceIds.length, 'resource')})`,
    );
    if (done) completion.value = null;
    return done !== null;
  }

  /** A tray stage was dropped on a row: that resource is booked, then the rest of the stage is proposed. */
  async function bookStage(probe: DragProbe, remove: () => void, label: string): Promise<boolean> {
    remove();
    const verdict = deps.evaluate(probe);
    if (!verdict.allowed || !probe.resourceId) {
      explain('Not booked', verdict.reasons[0] ?? 'choose a row', verdict.cited);
      return false;
    }
    const done = await submit(
      { kind: 'book', stageId: probe.stageId, resourceId: probe.resourceId, start: verdict.start },
      verdict.joins ? `${label} at the stage's time (${when(verdict.start)})` : label,
      undefined,
      { quiet: ['capacity'] },
    );
    if (!done) return false;
    selectedStage.value = probe.stageId;
    await openCompletion(probe.stageId, probe.resourceId, verdict.start);
    return true;
  }

  /** Takes a booking off the board (tray drop, Delete key, button); a partner who has seen it is told. */
  async function unbook(bookingId: string): Promise<boolean> {
    const b = booking(bookingId);
    if (!b || b.elsewhere) return false;
    const resource = resourceOf(b.resourceId);
    // The state machine the server enforces: work under way or done stays, and the Delete key says so.
    const allowed = nextState('unbook', b.state, {
      party: 'office',
      side: resource?.ownership === 'partner' ? 'partner' : 'own',
    });
    if (!allowed.ok) {
      message.info(allowed.reason);
      return false;
    }
    const name = stageName(b.stageId);
    if (HELD.includes(b.state)) {
      const partner = resource?.ownership === 'partner';
      const ok = await ask(
        `Take '${name}' off the board?`,
        partner
          ? `${resource?.firmName ?? 'The partner'} has ${b.state === 'sent' ? 'been asked for' : 'confirmed'} ${resource?.name ?? 'this booking'} on ${when(b.start)}. Taking it off cancels the request: they will be told by e-mail, with a calendar cancellation.`
          : `${resource?.name ?? 'This booking'} is confirmed for ${when(b.start)}. Taking it off frees them and puts the stage back in the tray.`,
        [
          { label: partner ? 'Take it off and tell them' : 'Take it off', value: 'yes', primary: true },
          { label: 'Keep it', value: 'no' },
        ],
      );
      if (ok !== 'yes') return false;
    }
    return (
      (await submit(
        { kind: 'remove', bookingId, version: b.version ?? 1 },
        `take off '${name}' (${resource?.name ?? 'booking'})`,
      )) !== null
    );
  }

  /** A declined (or pencilled) partner booking is sent as a request (again). */
  async function sendAgain(bookingId: string): Promise<boolean> {
    const b = booking(bookingId);
    if (!b) return false;
    const firm = resourceOf(b.resourceId)?.firmName ?? 'the partner';
    return (
      (await submit(
        { kind: 'publish', bookingId, version: b.version ?? 1 },
        `request for '${stageName(b.stageId)}' sent to ${firm} again`,
      )) !== null
    );
  }

  /**
   * A partner's proposed time, checked on the board first: taken alone when the plan holds; when
   * it doesn't (or the stage has other bookings), the whole stage moves to it with the stages
   * after it (the stage move with dependents) and then the proposal is taken.
   */
  async function acceptProposal(bookingId: string): Promise<boolean> {
    const data = deps.data();
    const index = deps.index();
    const b = booking(bookingId);
    if (!data || !index || !b?.proposal) return false;
    const proposal = b.proposal;
    const firm = resourceOf(b.resourceId)?.firmName ?? 'The partner';
    const own = bookingsOfStage(index, b.stageId);
    const alone = deps.evaluateSet(
      b.stageId,
      own.map((x) => (x.id === b.id ? { ...x, start: proposal.start, end: proposal.end } : x)),
      proposal.start,
    );
    const move = { stageId: b.stageId, start: proposal.start, end: proposal.end };
    const whole =
      own.length > 1 || !alone.allowed
        ? deps.evaluate({
            stageId: b.stageId,
            start: proposal.start,
            end: proposal.end,
            oldStart: Math.min(...own.map((x) => x.start)),
          })
        : null;
    const shifted = whole ? dependentsChoice(data, index, { stageId: b.stageId, start: proposal.start }) : null;
    const after = shifted?.options.find((o) => o.choice === 'all');
    const verdictText = alone.allowed
      ? alone.warnings.length
        ? `The board allows it, with a warning: ${alone.warnings[0]}`
        : 'The board finds nothing against it.'
      : `On its own it breaks the plan: ${alone.reasons[0]}`;
    const others =
      own.length > 1
        ? ` The stage's other ${plural(own.length - 1, 'booking')} would stay at ${when(Math.min(...own.map((x) => x.start)))} unless the stage moves.`
        : '';
    const partners = after?.partner.filter((p) => p.bookingId !== bookingId) ?? [];
    const buttons = [
      ...(alone.allowed ? [{ label: 'Accept', value: 'alone', primary: true }] : []),
      ...(whole && whole.allowed && after
        ? [
            {
              label: `Move the stage there${shifted!.dependents ? ` with ${plural(after.stageIds.length, 'stage')} after it` : ''}, then accept`,
              value: 'whole',
              primary: !alone.allowed,
            },
          ]
        : []),
      { label: 'Not now', value: 'no' },
    ];
    const extra =
      whole && after && (after.breaks.length || !whole.allowed)
        ? ` Moving the whole stage would not hold either: ${whole.reasons[0] ?? after.breaks[0]}`
        : '';
    const listed = partners.length
      ? ` Moving the stages after it asks again: ${partners.map((p) => `${p.firmName} ('${p.stageName}', ${p.state})`).join('; ')}.`
      : '';
    const choice = await ask(
      `${firm} proposes ${when(proposal.start)}`,
      `${verdictText}${others}${extra}${listed}`,
      buttons,
    );
    if (choice === 'alone')
      return (
        (await submit(
          { kind: 'accept-proposal', bookingId, version: b.version ?? 1 },
          `take ${firm}'s proposed time`,
        )) !== null
      );
    if (choice !== 'whole') return false;
    const versions = Object.fromEntries(
      data.bookings.filter((x) => x.stageId === b.stageId && x.state !== 'declined').map((x) => [x.id, x.version ?? 1]),
    );
    const moved = await submit(
      { kind: 'move', ...move, versions, dependents: 'all', askAgain: partners.map((p) => p.bookingId) },
      `move '${stageName(b.stageId)}' to ${firm}'s proposed time`,
    );
    if (!moved) return false;
    const now = moved.bookings.find((x) => x.id === bookingId);
    return (
      (await submit(
        { kind: 'accept-proposal', bookingId, version: now?.version ?? (b.version ?? 1) + 1 },
        `take ${firm}'s proposed time`,
      )) !== null
    );
  }

  /** Selecting a booking highlights its whole stage. */
  function select(bookingId: string | null): void {
    selectedStage.value = bookingId ? (booking(bookingId)?.stageId ?? null) : null;
  }

  return {
    completion,
    completionBusy,
    dependentsAsk,
    selectedStage,
    revealed,
    moveStage,
    moveTo,
    checkAt,
    bookStage,
    openCompletion,
    closeCompletion,
    applyCompletion,
    unbook,
    sendAgain,
    acceptProposal,
    select,
    reveal,
    hideRevealed,
    submit,
    ask,
    explain,
  };
}
