import { useEffect, useState } from 'react';
import type { KegUndoOfferView, KegView } from '../../../../shared/schemas/kegs.ts';
import { FormFrame } from '@/components/form/form-frame';
import { UnitNumberInput } from '@/components/form/unit-number-input';
import { useActionError } from '@/components/form/use-action-error';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { ConfirmDialog, Dialog } from '@/components/ui/dialog';
import { useKegAction, useMemberOptions, useTapBoard } from '@/features/kegs/api/kegs';
import { BigInput, BigSelect } from '@/components/ui/touch';
import { useUnits } from '@/hooks/use-units';
import { problemMessage } from '@/lib/api-client';

export type Open = null | 'check-out' | 'move' | 'level' | Ending;
/** The actions that end what the keg holds: each confirms what it will change first. */
export type Ending = 'return' | 'empty' | 'dump';

/** A keg dialog's form: large controls for the cellar, the browser's own checks, one wide button. */
const kegForm = { browserValidation: true, className: 'flex flex-col gap-3', submitClassName: 'min-h-12 w-full md:min-h-12 pointer-coarse:min-h-12' } as const;
const fieldLabel = 'flex flex-col gap-1 text-sm font-medium';

const inDays = (d: number) => {
  const t = new Date(Date.now() + d * 86_400_000);
  return t.toISOString().slice(0, 10);
};

export const CheckOutDialog = ({ keg, onClose }: { keg: KegView; onClose: () => void }) => {
  const members = useMemberOptions(true);
  const act = useKegAction(keg.id);
  const [memberId, setMemberId] = useState('');
  const [due, setDue] = useState(inDays(21));
  const { error, onSubmit } = useActionError();
  return (
    <Dialog open onClose={onClose} busy={act.isPending} title={`Check ${keg.code} out`} description="To a member, with the date it is due back.">
      <FormFrame
        {...kegForm}
        onSubmit={onSubmit(async () => {
          await act.mutateAsync({ action: 'check-out', body: { memberId, dueAt: new Date(`${due}T18:00:00`).toISOString() } });
          onClose();
        })}
        error={error}
        pending={act.isPending}
        submitLabel="Check out"
        submitDisabled={!memberId}
      >
        <label className={fieldLabel}>
          Member
          <BigSelect value={memberId} onChange={(e) => setMemberId(e.target.value)} required>
            <option value="">Pick a member…</option>
            {members.data?.map((m) => (
              <option key={m.id} value={m.id}>
                {m.name}
              </option>
            ))}
          </BigSelect>
        </label>
        <label className={fieldLabel}>
          Due back
          <BigInput type="date" value={due} min={inDays(1)} onChange={(e) => setDue(e.target.value)} required />
        </label>
      </FormFrame>
    </Dialog>
  );
};

export const MoveDialog = ({ keg, onClose }: { keg: KegView; onClose: () => void }) => {
  const board = useTapBoard();
  const act = useKegAction(keg.id);
  const [to, setTo] = useState<'cellar' | 'cold_room' | 'missing'>(keg.whereabouts === 'cold_room' ? 'cellar' : 'cold_room');
  const [tapId, setTapId] = useState('');
  const { error, onSubmit } = useActionError();
  const free = board.data?.taps.filter((t) => (!t.taken || t.keg?.id === keg.id) && t.state !== 'out_of_service') ?? [];
  return (
    <Dialog open onClose={onClose} busy={act.isPending} title={`Move ${keg.code}`}>
      <FormFrame
        {...kegForm}
        onSubmit={onSubmit(async () => {
          await act.mutateAsync({ action: 'move', body: { to, tapId: to === 'cold_room' && tapId ? tapId : null } });
          onClose();
        })}
        error={error}
        pending={act.isPending}
        submitLabel="Move"
      >
        <label className={fieldLabel}>
          To
          <BigSelect value={to} onChange={(e) => setTo(e.target.value as typeof to)}>
            <option value="cold_room">Cold room</option>
            <option value="cellar">Cellar</option>
            <option value="missing">Missing (not found)</option>
          </BigSelect>
        </label>
        {to === 'cold_room' && keg.state === 'holding' ? (
          <label className={fieldLabel}>
            On tap
            <BigSelect value={tapId} onChange={(e) => setTapId(e.target.value)}>
              <option value="">Not connected</option>
              {free.map((t) => (
                <option key={t.id} value={t.id}>
                  {t.code} · {t.position}
                  {t.state === 'needs_cleaning' ? ' (line needs cleaning)' : ''}
                </option>
              ))}
            </BigSelect>
          </label>
        ) : null}
      </FormFrame>
    </Dialog>
  );
};

export const LevelDialog = ({ keg, onClose }: { keg: KegView; onClose: () => void }) => {
  const units = useUnits();
  const act = useKegAction(keg.id);
  const [litres, setLitres] = useState<number | null>(keg.contents?.remainingLiters ?? null);
  const { error, onSubmit } = useActionError();
  return (
    <Dialog open onClose={onClose} busy={act.isPending} title={`How much is left in ${keg.code}?`} description="By weight or by eye; the tap board shows it.">
      <FormFrame
        {...kegForm}
        onSubmit={onSubmit(async () => {
          if (litres === null || !Number.isFinite(litres) || litres < 0) return `Give what is left, in ${units.labels.volume}.`;
          await act.mutateAsync({ action: 'level', body: { remainingLiters: litres } });
          onClose();
        })}
        error={error}
        pending={act.isPending}
        submitLabel="Save"
      >
        <label className={fieldLabel}>
          Left ({units.labels.volume})
          <UnitNumberInput
            kind="volume"
            digits={1}
            apiDigits={2}
            value={litres}
            onValueChange={setLitres}
            className="min-h-12 text-base md:min-h-12 pointer-coarse:min-h-12"
            required
          />
        </label>
      </FormFrame>
    </Dialog>
  );
};

const endingVerbs: Record<Ending, { title: (code: string) => string; confirm: string; done: (code: string) => string }> = {
  return: {
    title: (code) => `Record ${code} as returned?`,
    confirm: 'Record it returned',
    done: (code) => `${code} recorded as returned; clean it before it is filled again.`,
  },
  empty: {
    title: (code) => `Record ${code} as emptied?`,
    confirm: 'Record it emptied',
    done: (code) => `${code} recorded as emptied; clean it before it is filled again.`,
  },
  dump: {
    title: (code) => `Record the beer in ${code} as dumped (poured away)?`,
    confirm: 'Record it dumped',
    done: (code) => `The beer in ${code} recorded as dumped; clean the keg before it is filled again.`,
  },
};

/** A success message; after a return, an emptying or a dump it offers to undo it. */
export interface Notice {
  text: string;
  undo?: KegUndoOfferView | null;
}

/**
 * The message after an action. "Undo" shows until the server's offer ends (the page's clock is the
 * server's); any other action on the page clears the message, and the server refuses an undo once
 * the keg was touched.
 */
export const KegNotice = ({ kegId, notice, onUndone }: { kegId: string; notice: Notice; onUndone: (n: Notice | null, error?: string) => void }) => {
  const act = useKegAction(kegId);
  const until = notice.undo ? new Date(notice.undo.until).getTime() : 0;
  const [open, setOpen] = useState(() => until > Date.now());
  useEffect(() => {
    if (!until) return;
    const left = until - Date.now();
    if (left <= 0) return setOpen(false);
    const t = window.setTimeout(() => setOpen(false), left);
    return () => window.clearTimeout(t);
  }, [until]);
  const undo = notice.undo;
  return (
    <Alert tone="success">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <span>{notice.text}</span>
        {undo && open ? (
          <Button
            variant="secondary"
            className="min-h-11 md:min-h-9"
            pending={act.isPending}
            onClick={async () => {
              try {
                await act.mutateAsync({ action: 'undo', body: { actionId: undo.id } });
                onUndone({ text: 'Undone: the keg is back as it was, with its beer, carbonation plan and place.' });
              } catch (e) {
                setOpen(false);
                onUndone(null, problemMessage(e));
              }
            }}
          >
            Undo
          </Button>
        ) : null}
      </div>
    </Alert>
  );
};

/** Says what returning, emptying or dumping a keg will change before anything is recorded. */
export const EndingDialog = ({ keg, ending, onClose, onDone }: { keg: KegView; ending: Ending; onClose: () => void; onDone: (notice: Notice) => void }) => {
  const units = useUnits();
  const act = useKegAction(keg.id);
  const { error, run } = useActionError();
  const c = keg.carbonation;
  const verbs = endingVerbs[ending];
  return (
    <ConfirmDialog
      open
      title={verbs.title(keg.code)}
      confirmLabel={verbs.confirm}
      pending={act.isPending}
      error={error}
      onClose={onClose}
      onConfirm={() =>
        void run(async () => {
          const result = await act.mutateAsync(
            ending === 'return' ? { action: 'return', body: {} } : { action: 'empty', body: ending === 'dump' ? { dumped: true } : {} },
          );
          onDone({ text: verbs.done(keg.code), undo: result.undo ?? null });
          onClose();
        })
      }
    >
      <ul className="flex list-disc flex-col gap-1 pl-5" aria-label="What this changes">
        {ending === 'return' ? (
          <li>
            {keg.code} comes back{keg.member ? ` from ${keg.member.name}` : ''} to the cellar.
          </li>
        ) : null}
        {keg.contents ? (
          <li>
            {units.volume(keg.contents.remainingLiters)} of {keg.contents.batchName} recorded in it{' '}
            {ending === 'dump' ? 'are written off as dumped (a loss)' : 'are written off'}; the keg then holds nothing.
          </li>
        ) : (
          <li>It holds no beer on record.</li>
        )}
        {c ? (
          <li>
            The carbonation plan ({c.method === 'fast_start' ? 'fast start' : 'set and hold'} to {c.targetVolumes.toFixed(1)} volumes) closes.
          </li>
        ) : (
          <li>No carbonation plan is open.</li>
        )}
        {ending !== 'return' && keg.tap ? <li>It comes off tap {keg.tap.code}, whose line then needs cleaning.</li> : null}
        {keg.state !== 'out_of_service' ? <li>{keg.code} needs cleaning before it is filled again.</li> : null}
      </ul>
      <p className="mt-2 font-medium">You can undo it for 10 minutes from the message that follows, as long as nothing else is done with the keg.</p>
    </ConfirmDialog>
  );
};

/** A keg's page: what it holds, where it is, its carbonation, and its whole history. */
