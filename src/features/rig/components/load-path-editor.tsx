import { useEffect, useMemo, useRef, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import { Info, Plus } from 'lucide-react';
import { describeGear, parseBridle } from '../../../../shared/rigging';
import { voidsClearance } from '../../../../shared/clearance';
import { loadPathBodySchema, type Gear, type Point } from '../../../../shared/schemas/rig';
import type { ApparatusKind } from '../../../../shared/schemas/vocabulary';
import { Button } from '../../../components/ui/button';
import { ConfirmDialog } from '../../../components/ui/confirm';
import { SelectField } from '../../../components/ui/field';
import { ErrorState } from '../../../components/ui/states';
import { ApiError, errorMessage } from '../../../lib/api-client';
import { rigQueries, useRigMutations, type ClassType } from '../api';
import type { StudioFormat } from '../format';
import { ChainJoint, LinkCard, StructureCard } from './link-card';
import { LinkControls, type DraftLink, type LinkPatch } from './link-controls';
import { addLink, draftOf, moveLink, pathConfig, samePath, toBody, toLinkInputs } from './path-draft';
import { PathPreview } from './path-preview';

type Problems = Record<string, { link?: string; angle?: string }>;
/** What a save did to the clearance: voided it, left it standing, found none to void, or changed nothing. */
export type SaveOutcome = 'voided' | 'kept' | 'no_clearance' | 'unchanged';

/** Edits a point's load path as a draft, previews its load check, and saves it whole (PUT). */
export function LoadPathEditor({ point, fmt, classTypes, onDone }: { point: Point; fmt: StudioFormat; classTypes: ClassType[]; onDone: (outcome: SaveOutcome | null) => void }) {
  const { saveLoadPath } = useRigMutations();
  const spare = useQuery(rigQueries.gearList({ mounted: 'no', status: 'in_service' }));
  const [links, setLinks] = useState<DraftLink[]>(() => draftOf(point));
  const [addId, setAddId] = useState('');
  const [problems, setProblems] = useState<Problems>({});
  const [formError, setFormError] = useState<string | null>(null);
  const [announce, setAnnounce] = useState('');
  const [confirming, setConfirming] = useState(false);
  const [focusAfterMove, setFocusAfterMove] = useState<string | null>(null);
  const listRef = useRef<HTMLOListElement>(null);

  const original = useMemo(() => toLinkInputs(draftOf(point)), [point]);
  const edited = useMemo(() => toLinkInputs(links), [links]);
  const meetingIndex = useMemo(() => parseBridle(edited).meetingIndex, [edited]);
  const before = pathConfig(point.structuralRatingKn, original);
  const after = pathConfig(point.structuralRatingKn, edited);
  const changed = !samePath(before, after);
  const voids = changed && voidsClearance(before, after);
  const clearanceInForce = point.lastClearedAt !== null && point.clearanceVoidedAt === null;

  // Gear that may go into the path: spare in-service items, plus anything taken out of this path in the draft.
  const pool = useMemo(() => {
    const inDraft = new Set(links.map((l) => l.gear.id));
    const byId = new Map<number, Gear>();
    for (const g of spare.data ?? []) byId.set(g.id, g);
    for (const l of point.links ?? []) byId.set(l.gear.id, l.gear);
    return [...byId.values()].filter((g) => !inDraft.has(g.id)).sort((a, b) => describeGear(a).localeCompare(describeGear(b), undefined, { numeric: true }));
  }, [spare.data, point.links, links]);

  useEffect(() => {
    if (!focusAfterMove || !listRef.current) return;
    const [key, dir] = focusAfterMove.split(':');
    const same = listRef.current.querySelector<HTMLButtonElement>(`[data-move="${key}:${dir}"]`);
    const other = listRef.current.querySelector<HTMLButtonElement>(`[data-move="${key}:${dir === '1' ? '-1' : '1'}"]`);
    (same && !same.disabled ? same : other)?.focus();
    setFocusAfterMove(null);
  }, [focusAfterMove, links]);

  const edit = (next: DraftLink[], message?: string) => {
    setLinks(next);
    setProblems({});
    setFormError(null);
    if (message) setAnnounce(message);
  };
  const patch = (key: string, p: LinkPatch) => edit(links.map((l) => (l.key === key ? { ...l, ...p, ...(p.leg === null ? { angleText: '' } : {}) } : l)));
  const move = (index: number, dir: -1 | 1) => {
    const link = links[index];
    edit(moveLink(links, index, dir), `${describeGear(link.gear)} is now link ${index + dir + 1} of ${links.length}.`);
    setFocusAfterMove(`${link.key}:${dir}`);
  };
  const add = () => {
    const gear = pool.find((g) => String(g.id) === addId);
    if (!gear) return;
    const next = addLink(links, gear);
    if (typeof next === 'string') return setFormError(next);
    edit(next, `${describeGear(gear)} added to the path.`);
    setAddId('');
  };

  const save = () => {
    setConfirming(false);
    const body = toBody(links);
    const checked = loadPathBodySchema.safeParse(body);
    if (!checked.success) {
      const found: Problems = {};
      for (const issue of checked.error.issues) {
        const [, index, field] = issue.path;
        const key = typeof index === 'number' ? links[index]?.key : undefined;
        if (!key) { setFormError(issue.message); continue; }
        found[key] = { ...found[key], ...(field === 'includedAngleDeg' ? { angle: issue.message } : { link: issue.message }) };
      }
      setProblems(found);
      return;
    }
    saveLoadPath.mutate({ id: point.id, body: checked.data }, {
      onSuccess: (res) => {
        if (res.changed === false) toast.info('The path is the same as the saved one, so nothing changed.');
        else toast.success(res.voided ? `Load path of ${point.label} saved. Its clearance is void until a rigger re-inspects it.` : `Load path of ${point.label} saved.`);
        onDone(res.changed === false ? 'unchanged' : res.voided ? 'voided' : clearanceInForce ? 'kept' : 'no_clearance');
      },
      onError: (err) => {
        const ids = err instanceof ApiError ? ((err.details as { gearIds?: number[] } | undefined)?.gearIds ?? []) : [];
        const found: Problems = {};
        for (const l of links) {
          if (!ids.includes(l.gear.id)) continue;
          found[l.key] = { link: err instanceof ApiError && err.code === 'gear_retired' ? 'This item is retired: take it out of the path.' : 'This item is now in another point’s path: swap it for a spare.' };
        }
        if (err instanceof ApiError) {
          for (const [field, message] of Object.entries(err.fields)) {
            const m = /^links\.(\d+)\.(\w+)$/.exec(field);
            const key = m ? links[Number(m[1])]?.key : undefined;
            if (key) found[key] = { ...found[key], ...(m?.[2] === 'includedAngleDeg' ? { angle: message } : { link: message }) };
          }
        }
        setProblems(found);
        setFormError(errorMessage(err));
      },
    });
  };

  const fallbackApparatus: ApparatusKind = point.apparatus[0] ?? 'fabric';
  return (
    <div className="space-y-6">
      <p className="sr-only" aria-live="polite">{announce}</p>
      <ol ref={listRef} aria-label="Load path being edited, from the structure down" className="list-none">
        <li><StructureCard structure={point.structure} ratingKn={point.structuralRatingKn} fmt={fmt} /></li>
        {links.map((link, i) => (
          <li key={link.key}>
            <ChainJoint />
            <LinkCard link={{ ...link, includedAngleDeg: edited[i].includedAngleDeg }} index={i} fmt={fmt} problem={problems[link.key]?.link}>
              <LinkControls
                link={link}
                index={i}
                count={links.length}
                pool={pool}
                angleError={problems[link.key]?.angle}
                bridleMeeting={i === meetingIndex}
                onChange={(p) => patch(link.key, p)}
                onMove={(dir) => move(i, dir)}
                onSwap={(gear) => edit(links.map((l) => (l.key === link.key ? { ...l, gear } : l)), `${describeGear(link.gear)} swapped for ${describeGear(gear)}.`)}
                onRemove={() => edit(links.filter((l) => l.key !== link.key), `${describeGear(link.gear)} taken out of the path.`)}
              />
            </LinkCard>
          </li>
        ))}
      </ol>

      <div className="flex flex-wrap items-end gap-2">
        <div className="w-72">
          <SelectField label="Add a link" hint="Spare gear in service, not mounted on any other point." value={addId} onChange={(e) => setAddId(e.target.value)} disabled={spare.isPending}>
            <option value="">{spare.isPending ? 'Loading spare gear…' : pool.length === 0 ? 'No spare gear in service' : 'Pick a gear item'}</option>
            {pool.map((g) => <option key={g.id} value={g.id}>{describeGear(g)}</option>)}
          </SelectField>
        </div>
        <Button type="button" variant="secondary" onClick={add} disabled={!addId}><Plus className="size-4" aria-hidden /> Add to the path</Button>
      </div>
      {spare.isError ? <ErrorState error={spare.error} retry={() => spare.refetch()} /> : null}

      <VoidNote changed={changed} voids={voids} clearanceInForce={clearanceInForce} />
      <PathPreview links={edited} structuralRatingKn={point.structuralRatingKn} classTypes={classTypes} fmt={fmt} apparatus={fallbackApparatus} />

      {formError ? <p role="alert" className="text-sm font-medium text-stop-700">{formError}</p> : null}
      <div className="flex flex-wrap gap-2">
        <Button type="button" busy={saveLoadPath.isPending} disabled={!changed} onClick={() => (voids && clearanceInForce ? setConfirming(true) : save())}>Save load path</Button>
        <Button type="button" variant="secondary" onClick={() => onDone(null)}>Cancel</Button>
      </div>
      <ConfirmDialog open={confirming} title={`Void the clearance of ${point.label}?`} confirmLabel="Save and void the clearance" busy={saveLoadPath.isPending} onCancel={() => setConfirming(false)} onConfirm={save}>
        This change touches the fixed rigging. Once saved, the point is blocked and no class can be booked on it until a rigger inspects the new path and clears it.
      </ConfirmDialog>
    </div>
  );
}

function VoidNote({ changed, voids, clearanceInForce }: { changed: boolean; voids: boolean; clearanceInForce: boolean }) {
  const now = !changed
    ? 'No changes yet.'
    : voids
      ? clearanceInForce
        ? 'This change touches the fixed rigging: saving it voids the clearance until a rigger re-inspects the point.'
        : 'This change touches the fixed rigging. The point has no clearance in force; a rigger clears it after inspecting the new path.'
      : clearanceInForce
        ? 'Only the mounted apparatus changes: the clearance stands, as the apparatus carries its own inspection.'
        : 'Only the mounted apparatus changes, which voids nothing. The point has no clearance in force yet.';
  return (
    <div className="flex items-start gap-2 rounded-lg border border-line bg-white px-3 py-2 text-sm" role="status">
      <Info className="mt-0.5 size-4 shrink-0 text-pine-700" aria-hidden />
      <div>
        <p className="font-medium">{now}</p>
        <p className="text-muted">Adding, removing, reordering or swapping a fixed link, or changing how one is loaded, voids the clearance until the point is re-inspected. Swapping only the mounted apparatus does not.</p>
      </div>
    </div>
  );
}
