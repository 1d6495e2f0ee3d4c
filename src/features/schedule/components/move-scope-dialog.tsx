import { Sheet } from '../../../components/ui/sheet';
import { Button } from '../../../components/ui/button';
import type { MoveRequest } from './schedule-calendar';
import { whenShort } from '../format';
import { MAIL_NOTE, type Scope } from './scope-choice';

/** After a drag or resize of a class from a series: this class only, or this and the following? */
export function MoveScopeDialog({ move, timeZone, onChoose, onDismiss }: { move: MoveRequest | null; timeZone: string; onChoose: (scope: Scope) => void; onDismiss: () => void }) {
  const s = move?.session;
  return (
    <Sheet open={move !== null} onClose={onDismiss} title={s ? `Move ${s.className}?` : 'Move the class?'} description="This class is part of a repeating series.">
      {move && s ? (
        <div className="space-y-4 text-sm">
          <p>
            From <span className="font-medium">{whenShort(s.startsAt, s.endsAt, timeZone)}</span> to{' '}
            <span className="font-medium">{whenShort(move.startsAt, move.endsAt, timeZone)}</span>.
          </p>
          <p className="text-muted">“This and the following” shifts every later class of the series by the same amount. Each class is re-checked; {MAIL_NOTE.toLowerCase()}</p>
          <div className="flex flex-wrap justify-end gap-2">
            <Button type="button" variant="ghost" onClick={onDismiss}>Don’t move</Button>
            <Button type="button" variant="secondary" onClick={() => onChoose('following')}>This and the following</Button>
            <Button type="button" onClick={() => onChoose('this')}>This class only</Button>
          </div>
        </div>
      ) : null}
    </Sheet>
  );
}
