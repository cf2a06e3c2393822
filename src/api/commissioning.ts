/**
 * Typed calls for a job's handover records: the commissioning record (saved whole, at the version
 * loaded), the electrical certificate and the office's waiver, and the partner's certificate upload.
 */
import { api } from '@/api/client';
import { uploadTo } from '@/api/job-work';
import type { CertificateView, CommissioningView, PutCommissioning } from '@shared/schemas/commissioning';

export const commissioningApi = {
  record: (jobId: string) => api.get<CommissioningView>(`/api/jobs/${jobId}/commissioning`),
  save: (jobId: string, body: PutCommissioning) => api.put<CommissioningView>(`/api/jobs/${jobId}/commissioning`, body),
  certificate: (jobId: string) => api.get<CertificateView>(`/api/jobs/${jobId}/certificate`),
  /** Records (or with null takes back) the reason; `reasonWas` is the reason as loaded, null for none. */
  waive: (jobId: string, reason: string | null, reasonWas: string | null) =>
    api.put<CertificateView>(`/api/jobs/${jobId}/certificate-waiver`, { reason, reasonWas }),
  /** The partner's PDF for its own electrical connection slot. */
  uploadCertificate: (slotId: string, file: File, csrfToken: string | null, onProgress: (fraction: number) => void) =>
    uploadTo<{ name: string; uploadedAt: string }>(
      `/api/partner/slots/${slotId}/certificate`,
      file,
      csrfToken,
      onProgress,
    ),
};
