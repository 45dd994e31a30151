import type { ImportMappingInput, ImportProgressDto, ImportResult } from '../../../../shared/schemas/batches.ts';
import { ApiProblem, api, type ProblemFieldError } from '@/lib/api-client';

export interface UploadProgress {
  /** Bytes sent of the file, 0–1. */
  upload: number;
  /** What the server reports while it reads, checks and writes the rows. */
  server: ImportProgressDto | null;
}

export interface ImportRequest {
  batchId: string;
  file: File;
  mapping?: ImportMappingInput;
  dryRun: boolean;
  onProgress?: (progress: UploadProgress) => void;
  signal?: AbortSignal;
}

/**
 * Uploads a readings file with XMLHttpRequest, whose upload events give a progress bar, and polls
 * the server's progress row for the import itself (any instance answers: the row is in PostgreSQL).
 */
export async function importReadings({ batchId, file, mapping, dryRun, onProgress, signal }: ImportRequest): Promise<ImportResult> {
  const { token } = await api.get<{ token: string }>('/api/auth/csrf');
  const progressId = crypto.randomUUID();
  const form = new FormData();
  form.append('progressId', progressId);
  if (mapping) form.append('mapping', JSON.stringify(mapping));
  form.append('file', file, file.name);

  let upload = 0;
  let server: ImportProgressDto | null = null;
  const report = () => onProgress?.({ upload, server });
  let polling = true;
  const base = `/api/batches/${encodeURIComponent(batchId)}/readings/import`;
  const poll = async () => {
    while (polling) {
      await new Promise((r) => setTimeout(r, 400));
      if (!polling) break;
      try {
        const res = await api.get<{ progress: ImportProgressDto }>(`${base}/progress/${progressId}`);
        if (polling) {
          server = res.progress;
          report();
        }
      } catch {
        // Not started yet (404) or a blip: ask again.
      }
    }
  };

  const result = new Promise<ImportResult>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `${base}${dryRun ? '?dryRun=1' : ''}`);
    xhr.setRequestHeader('X-CSRF-Token', token);
    xhr.setRequestHeader('Accept', 'application/json, application/problem+json');
    xhr.withCredentials = true;
    xhr.upload.onprogress = (event) => {
      if (event.lengthComputable) {
        upload = event.loaded / event.total;
        report();
      }
    };
    xhr.upload.onload = () => {
      upload = 1;
      report();
      void poll();
    };
    xhr.onerror = () => reject(new ApiProblem({ status: 0, title: "Can't reach the server", detail: 'Check your connection and try again.' }));
    xhr.onabort = () => reject(new DOMException('Aborted', 'AbortError'));
    xhr.onload = () => {
      let body: Record<string, unknown>;
      try {
        body = JSON.parse(xhr.responseText || '{}') as Record<string, unknown>;
      } catch {
        body = {};
      }
      if (xhr.status >= 200 && xhr.status < 300) resolve(body as unknown as ImportResult);
      else {
        const errors = Array.isArray(body.errors) ? (body.errors as ProblemFieldError[]) : [];
        reject(
          new ApiProblem({
            status: xhr.status,
            title: typeof body.title === 'string' ? body.title : `Upload failed (${xhr.status})`,
            ...(typeof body.detail === 'string' ? { detail: body.detail } : {}),
            errors,
          }),
        );
      }
    };
    signal?.addEventListener('abort', () => xhr.abort());
    xhr.send(form);
  });
  try {
    return await result;
  } finally {
    polling = false;
  }
}
