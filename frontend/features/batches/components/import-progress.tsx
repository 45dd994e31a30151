import type { UploadProgress } from '@/features/batches/api/import-readings';
import { formatCount } from '@/utils/format';

const phaseLabels = { reading: 'Reading the file', checking: 'Checking the rows', writing: 'Writing the readings', done: 'Done', failed: 'Stopped' } as const;

/** Upload progress (from the browser) and the server's own progress on the rows. */
export const ImportProgress = ({ progress, label }: { progress: UploadProgress; label: string }) => {
  const uploading = progress.upload < 1;
  const server = progress.server;
  const fraction = uploading ? progress.upload : server && server.rowsTotal ? Math.min(1, server.rowsDone / server.rowsTotal) : null;
  const text = uploading
    ? `Uploading… ${Math.round(progress.upload * 100)} %`
    : server
      ? `${phaseLabels[server.phase]}${server.rowsTotal ? `: ${formatCount(server.rowsDone)} of ${formatCount(server.rowsTotal)} rows` : server.rowsDone ? `: ${formatCount(server.rowsDone)} rows` : ''}`
      : 'Uploaded; the server is reading the file…';
  return (
    <div className="flex flex-col gap-1" data-testid="import-progress">
      <div className="flex justify-between text-xs text-ink-muted">
        <span>{label}</span>
        <span aria-live="polite">{text}</span>
      </div>
      <progress
        className="h-2 w-full overflow-hidden rounded-full accent-copper [&::-webkit-progress-bar]:bg-ground-deep [&::-webkit-progress-value]:bg-copper"
        max={1}
        {...(fraction === null ? {} : { value: fraction })}
        aria-label={label}
      />
    </div>
  );
};
