import { type StepViolation } from '../../../../shared/cellar/sanitation-rules.ts';

/**
 * Why a step would be refused, beside the step; for a rule that may be broken with a reason, the
 * box for that reason (the step is then recorded as an exception and the audit report lists it).
 */
export const StepProblems = ({
  id,
  problems,
  server,
  reason,
  onReason,
}: {
  id: string;
  problems: StepViolation[];
  server: string[];
  reason: string;
  onReason: (v: string) => void;
}) => {
  const messages = [...new Set([...problems.map((p) => p.message), ...server])];
  if (!messages.length) return null;
  const exceptable = problems.length > 0 && problems.every((p) => p.exceptable);
  return (
    <div id={id} className="mt-3 flex flex-col gap-2 rounded-md border border-danger/40 bg-danger-soft px-3 py-2 text-sm text-danger-strong" role="alert">
      <ul className="list-disc pl-5">
        {messages.map((m) => (
          <li key={m}>{m}</li>
        ))}
      </ul>
      {exceptable ? (
        <label className="flex flex-col gap-1 font-medium text-ink">
          Reason to record it as an exception
          <textarea
            className="min-h-20 w-full rounded-md border border-line-strong bg-surface px-3 py-2 text-base text-ink"
            value={reason}
            maxLength={500}
            onChange={(e) => onReason(e.target.value)}
          />
          <span className="text-xs font-normal text-ink-muted">Or correct the value above. An exception is listed in the audit report with its reason.</span>
        </label>
      ) : problems.length ? (
        <p className="text-xs">This cannot be recorded as an exception: correct it.</p>
      ) : null}
    </div>
  );
};
