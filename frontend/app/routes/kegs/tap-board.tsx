import { Link } from 'react-router-dom';
import { Alert } from '@/components/ui/alert';
import { Badge } from '@/components/ui/badge';
import { Spinner } from '@/components/ui/spinner';
import { useTapBoard } from '@/features/kegs/api/kegs';
import { Cautions } from '@/components/safety/cautions';
import { BeerNotes, FillGauge } from '@/features/kegs/components/keg-bits';
import { cellarPaths } from '@/config/cellar-paths';
import { StateBadge } from '@/features/equipment/components/state-badge';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useUnits } from '@/hooks/use-units';
import { problemMessage } from '@/lib/api-client';
import { formatAbv, formatDate } from '@/utils/format';

/** The cold room's taps: which keg is on which, what it holds and how full the co-op thinks it is. */
const TapBoardRoute = () => {
  useDocumentTitle('Tap board');
  const board = useTapBoard();
  const units = useUnits();
  if (board.isPending) return <Spinner label="Loading the tap board" />;
  if (board.isError) return <Alert tone="error">{problemMessage(board.error)}</Alert>;
  return (
    <div className="flex flex-col gap-4">
      <ol className="grid gap-3 sm:grid-cols-2 xl:grid-cols-4" aria-label="Taps">
        {board.data.taps.map((t) => (
          <li key={t.id} className={`flex flex-col gap-2 rounded-lg border p-3 ${t.taken ? 'border-copper/50 bg-surface' : 'border-line bg-ground'}`}>
            <div className="flex items-center justify-between gap-2">
              <h2 className="text-lg">{t.code}</h2>
              {t.state === 'out_of_service' ? (
                <StateBadge state="out_of_service" />
              ) : t.taken ? (
                <Badge tone="copper">On tap</Badge>
              ) : (
                <Badge tone="muted">Free</Badge>
              )}
            </div>
            <p className="text-xs text-ink-muted">{t.position}</p>
            {t.keg ? (
              <div className="flex flex-col gap-1">
                <Link to={cellarPaths.keg(t.keg.id)} className="text-base font-semibold">
                  {t.keg.code}
                </Link>
                {t.keg.contents ? (
                  <>
                    <p className="font-medium">{t.keg.contents.batchName}</p>
                    <p className="text-xs text-ink-muted">
                      {t.keg.contents.style}
                      {t.keg.contents.abv !== null ? ` · ${formatAbv(t.keg.contents.abv)}` : ''}
                    </p>
                    <FillGauge keg={t.keg} large />
                    <BeerNotes contents={t.keg.contents} compact />
                    {t.keg.contents.bestBefore ? (
                      <p className={`text-xs ${t.keg.contents.bestBeforeState === 'past' ? 'font-medium text-danger' : 'text-ink-muted'}`}>
                        {t.keg.contents.bestBeforeState === 'past' ? 'Past best-before' : 'Best before'} {formatDate(t.keg.contents.bestBefore)}
                      </p>
                    ) : null}
                  </>
                ) : (
                  <p className="text-sm text-ink-muted">Empty</p>
                )}
                {t.keg.carbonation ? <p className="text-xs text-ink-muted">Carbonated by {formatDate(t.keg.carbonation.readyAt)}</p> : null}
              </div>
            ) : t.taken ? (
              <p className="text-sm text-ink-muted">Taken</p>
            ) : (
              <p className="text-sm text-ink-muted">No keg connected{t.state === 'needs_cleaning' ? ' · line needs cleaning' : ''}</p>
            )}
            {t.lineLengthM !== null ? (
              <p className="mt-auto text-xs text-ink-muted">
                Line {t.lineLengthM} m × {t.lineInsideDiameterMm} mm inside{t.coldRoomTempC !== null ? ` · ${units.temperature(t.coldRoomTempC)}` : ''}
              </p>
            ) : null}
          </li>
        ))}
      </ol>
      <Cautions kind="pressure" />
    </div>
  );
};

export default TapBoardRoute;
