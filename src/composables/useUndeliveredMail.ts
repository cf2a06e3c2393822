import { api } from '@/api/client';
import type { SendAgainResult, UndeliveredMailList } from '@shared/schemas/mail-status';
import { useApiResource } from './useApiResource';
import { useAction } from './useAction';

/**
 * The firm's e-mails that did not go (all of them, or one job's), and "Send again", which hands
 * the same message back to be sent and reloads the list.
 * @example const { list, busy, sendAgain } = useUndeliveredMail(() => jobId.value)
 */
export function useUndeliveredMail(jobId: () => string | null = () => null) {
  const list = useApiResource<UndeliveredMailList>(() => ({
    path: '/api/mail/undelivered',
    query: jobId() ? { jobId: jobId()! } : undefined,
  }));
  const { busy, run } = useAction();
  let result: SendAgainResult | null = null;

  async function sendAgain(id: string): Promise<void> {
    const ok = await run(
      id,
      async () => {
        result = await api.post<SendAgainResult>('/api/mail/send-again', { id });
      },
      () =>
        result?.requeued
          ? 'Sending it again now.'
          : result?.status === 'sent'
            ? 'It has already gone.'
            : 'It is already on its way.',
    );
    if (ok) await list.refresh();
  }

  return { list, busy, sendAgain };
}
