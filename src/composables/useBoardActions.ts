import { h } from 'vue';
import { useDialog, useMessage } from 'naive-ui';
import type { BoardData } from '@shared/board-data';
import { dependentStageIds } from '@shared/board-actions';
import type { BoardIndex } from '@shared/scheduler/index';
import { refusalOf, type Intent, type MoveIntent } from '@/components/board/drop-actions';
import type { DragProbe, DragVerdict } from './useDragCheck';

interface Deps {
  data: () => BoardData | null;
  index: () => BoardIndex | null;
  check: (probe: DragProbe) => DragVerdict;
  send: (intent: Intent, label: string) => Promise<{ warnings: { message: string }[] }>;
  reload: () => Promise<void>;
}

/**
 * What happens after a drop, a resize, a key press or a chosen slot: the engine's verdict first
 * (a refusal snaps back with its reason), a confirmation where a partner would be asked again, an
 * offer to move the stages after it, then the server's check and save.
 */
export function useBoardActions(deps: Deps) {
  const dialog = useDialog();
  const message = useMessage();

  const ask = (title: string, content: string, buttons: { label: string; value: string; primary?: boolean }[]) =>
    new Promise<string | null>((resolve) => {
      const d = dialog.create({
        title, content, closable: true, maskClosable: false, onClose: () => resolve(null), onMaskClick: () => resolve(null),
        action: () => h('div', { class: 'dialog-actions' }, buttons.map((b) => h('button', {
          type: 'button', class: ['dialog-button', b.primary ? 'dialog-button--primary' : ''], autofocus: b.primary,
          onClick: () => { d.destroy(); resolve(b.value); },
        }, b.label))),
      });
    });

  async function submit(intent: Intent, label: string, onFail?: () => void): Promise<boolean> {
    try {
      const result = await deps.send(intent, label);
      if (result.warnings.length) message.warning(`Saved. Note: ${result.warnings[0]!.message}${result.warnings.length > 1 ? ` (+${result.warnings.length - 1} more)` : ''}`, { duration: 6000 });
      else message.success(`Saved: ${label}`);
      return true;
    } catch (error) {
      onFail?.();
      const refusal = refusalOf(error);
      if (refusal.kind === 'stale') await deps.reload();
      message.error(refusal.message, { duration: 8000, closable: true });
      return false;
    }
  }

  /** A booked stage was dropped, resized or moved by keyboard. */
  async function moveStage(probe: DragProbe, revert: () => void, label: string): Promise<boolean> {
    const verdict = deps.check(probe);
    if (!verdict.allowed) {
      revert();
      message.error(`Not moved: ${verdict.reasons[0] ?? 'that time breaks a rule'}`, { duration: 8000, closable: true });
      return false;
    }
    const data = deps.data();
    const index = deps.index();
    if (!data || !index) { revert(); return false; }
    const own = data.bookings.filter((b) => b.stageId === probe.stageId && b.state !== 'declined');
    if (own.some((b) => b.state === 'confirmed' || b.state === 'sent')) {
      const ok = await ask('Move a booking the firm has seen?', 'This stage was already sent or confirmed. Moving it asks the firm again.', [
        { label: 'Move and ask again', value: 'yes', primary: true }, { label: 'Keep it where it was', value: 'no' },
      ]);
      if (ok !== 'yes') { revert(); return false; }
    }
    const after = dependentStageIds(index, probe.stageId).filter((id) => data.bookings.some((b) => b.stageId === id));
    let moveDependents = false;
    if (after.length && probe.oldStart !== undefined && probe.end === undefined) {
      const choice = await ask('Move the stages after it too?', `${after.length} booked stage${after.length > 1 ? 's depend' : ' depends'} on this one. Move ${after.length > 1 ? 'them' : 'it'} by the same working time, keeping the gaps?`, [
        { label: `Move all ${after.length + 1}`, value: 'all', primary: true }, { label: 'Only this stage', value: 'one' }, { label: 'Cancel', value: 'cancel' },
      ]);
      if (choice === null || choice === 'cancel') { revert(); return false; }
      moveDependents = choice === 'all';
    }
    const spanStart = Math.min(...own.map((b) => b.start));
    const intent: MoveIntent = {
      kind: 'move', stageId: probe.stageId,
      start: probe.oldStart !== undefined ? spanStart + (verdict.start - probe.oldStart) : verdict.start,
      ...(probe.end !== undefined ? { end: probe.end } : {}),
      ...(probe.resourceId && probe.resourceId !== probe.oldResourceId ? { resourceId: probe.resourceId, bookingId: probe.bookingId } : {}),
      versions: Object.fromEntries(own.map((b) => [b.id, b.version ?? 1])),
      moveDependents,
    };
    return submit(intent, label, revert);
  }

  /** A tray stage was dropped on a row. */
  async function bookStage(probe: DragProbe, remove: () => void, label: string): Promise<boolean> {
    remove();
    const verdict = deps.check(probe);
    if (!verdict.allowed || !probe.resourceId) {
      message.error(`Not booked: ${verdict.reasons[0] ?? 'choose a row'}`, { duration: 8000, closable: true });
      return false;
    }
    return submit({ kind: 'book', stageId: probe.stageId, resourceId: probe.resourceId, start: verdict.start }, label);
  }

  return { moveStage, bookStage, submit, ask };
}
