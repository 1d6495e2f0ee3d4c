import { useEffect, useRef, useState } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { ClipboardCheck, Pencil, Printer, TriangleAlert } from 'lucide-react';
import { describeGear, formatForce } from '../../../shared/rigging';
import { isApparatusKind } from '../../../shared/schemas/vocabulary';
import { Button } from '../../components/ui/button';
import { Caution } from '../../components/ui/caution';
import { Card, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { ApiError } from '../../lib/api-client';
import { paths } from '../../lib/paths';
import { rigQueries, type GearDetail } from './api';
import { useRigAccess } from './access';
import { gateLabels, materialLabels, type StudioFormat } from './format';
import { useStudioFormat } from './use-studio-format';
import { BackLink } from './components/back-link';
import { DocumentsPanel } from './components/documents-panel';
import { GearActions } from './components/gear-actions';
import { GearEvents } from './components/gear-events';
import { GearForm } from './components/gear-form';
import { GearStatusBadge, gearNeedsInspection } from './components/gear-status-badge';
import { gearStandingAt } from '../../../shared/clearance/gear-standing';
import { GearInspectionForm } from '../inspections/components/gear-inspection-form';
import { Detail } from './components/detail';

export function GearPage({ id }: { id: number }) {
  const gear = useQuery(rigQueries.gearItem(id));
  const { studio, fmt } = useStudioFormat();
  const failed = gear.error ?? studio.error;
  if (failed) {
    const missing = failed instanceof ApiError && failed.status === 404;
    return (
      <div className="max-w-5xl space-y-4">
        <BackLink to={paths.gear}>Gear</BackLink>
        <ErrorState error={missing ? new Error('There is no gear item with this number. Go back to the gear list.') : failed} retry={missing ? undefined : () => { void gear.refetch(); void studio.refetch(); }} />
      </div>
    );
  }
  if (!gear.data || !fmt) return <Loading label="Loading the gear item…" />;
  return <GearView gear={gear.data} fmt={fmt} />;
}

/** What an item recorded as usable still needs, in words (PRODUCT.md §3). */
const STANDING_NEXT = {
  quarantined: 'Out of use until an after-incident inspection passes.',
  past_service_life: 'Past its service life: retire it and fit a replacement.',
  never_inspected: 'Never inspected: it needs an inspection before use.',
  inspection_lapsed: 'Its own inspection has lapsed: inspect it before use.',
} as const;

function GearView({ gear, fmt }: { gear: GearDetail; fmt: StudioFormat }) {
  const { canEdit, isRigger } = useRigAccess();
  const [editing, setEditing] = useState(false);
  const [params, setParams] = useSearchParams();
  const now = new Date();
  const standing = gearStandingAt(gear, now);
  const needsInspection = gearNeedsInspection(gear, now);
  const inspecting = isRigger && gear.status !== 'retired' && params.get('inspect') === '1';
  const setInspecting = (on: boolean) => setParams((old) => { const n = new URLSearchParams(old); if (on) n.set('inspect', '1'); else n.delete('inspect'); return n; }, { replace: !on });
  const inspectHeading = useRef<HTMLHeadingElement>(null);
  useEffect(() => { if (inspecting) inspectHeading.current?.focus(); }, [inspecting]);
  const kn = (v: number | null) => (v === null ? 'Not rated' : fmt.unit === 'kN' ? fmt.force(v) : `${fmt.force(v)} (${formatForce(v, 'kN', 2)})`);
  return (
    <div className="max-w-5xl space-y-6">
      <BackLink to={paths.gear}>Gear</BackLink>
      <PageHeader
        title={describeGear(gear)}
        actions={
          <>
            {isRigger && needsInspection && !inspecting ? (
              <Link to={paths.inspectGear(gear.id)} className="inline-flex min-h-11 items-center gap-2 rounded-lg bg-pine-700 px-4 py-2 text-sm font-medium text-white hover:bg-pine-800"><ClipboardCheck className="size-4" aria-hidden /> Inspect</Link>
            ) : null}
            <Link to={paths.reportFault({ gearId: gear.id })} className="inline-flex min-h-11 items-center gap-2 rounded-lg border border-line bg-white px-4 py-2 text-sm font-medium hover:bg-pine-50"><TriangleAlert className="size-4" aria-hidden /> Report a fault</Link>
            <Link to={`${paths.labels}?gear=${gear.id}`} className="inline-flex min-h-11 items-center gap-2 rounded-lg border border-line bg-white px-4 py-2 text-sm font-medium hover:bg-pine-50"><Printer className="size-4" aria-hidden /> Print its label</Link>
            {canEdit && !editing ? <Button variant="secondary" onClick={() => setEditing(true)}><Pencil className="size-4" aria-hidden /> Edit item</Button> : null}
          </>
        }
      >
        {[gear.maker, gear.model].filter(Boolean).join(' ') || 'Maker and model not entered'}
      </PageHeader>

      <Card className="space-y-3">
        <div className="flex flex-wrap items-center gap-3">
          <GearStatusBadge gear={gear} at={now} />
          {gear.statusReason ? <span className="text-sm">{gear.statusReason}</span> : null}
        </div>
        {standing !== 'in_service' && standing !== 'retired' ? <p className="text-sm font-medium text-stop-700">{STANDING_NEXT[standing]}</p> : null}
        <dl className="grid gap-x-6 gap-y-2 text-sm sm:grid-cols-2">
          <Detail term={isApparatusKind(gear.kind) ? 'Own inspection valid until' : 'Inspected until'} value={fmt.when(gear.inspectedUntil, 'Not yet inspected — it needs an inspection before use')} />
          <Detail term="Service life ends" value={fmt.day(gear.serviceLifeEndsOn, 'No service life entered')} />
          <div>
            <dt className="text-muted">Mounted on</dt>
            <dd>{gear.pointId ? <Link to={paths.point(gear.pointId)} className="inline-flex min-h-11 items-center text-pine-700 underline underline-offset-2">Point {gear.pointLabel ?? gear.pointId}</Link> : 'Spare — not in any load path'}</dd>
          </div>
        </dl>
        <Caution />
      </Card>

      {inspecting ? (
        <Card className="space-y-3">
          <h2 ref={inspectHeading} tabIndex={-1} className="font-semibold">Inspect {describeGear(gear)}</h2>
          <p className="text-sm text-muted">{gear.status === 'quarantined' ? 'An after-incident inspection that passes returns the item to service.' : 'A pass renews the item’s own inspection.'}{gear.pointLabel ? ` Point ${gear.pointLabel} holds it.` : ''}</p>
          <GearInspectionForm gear={gear} onDone={() => setInspecting(false)} />
          <Button variant="ghost" onClick={() => setInspecting(false)}>Cancel</Button>
        </Card>
      ) : null}

      {editing ? <GearForm gear={gear} onDone={() => setEditing(false)} /> : (
        <Card>
          <h2 className="mb-3 font-semibold">Ratings and details</h2>
          <dl className="grid gap-x-6 gap-y-2 text-sm sm:grid-cols-2">
            <Detail term="Breaking strength, major axis" value={kn(gear.majorKn)} />
            <Detail term="Minor axis" value={gear.minorKn === null ? 'Not rated — counted at 30 % of the major axis' : kn(gear.minorKn)} />
            <Detail term="Gate open" value={gear.gateOpenKn === null ? 'Not rated — a gate-open link fails the check' : kn(gear.gateOpenKn)} />
            <Detail term="Working load limit" value={kn(gear.wllKn)} />
            <Detail term="Multi-directional" value={gear.multiDirectional ? 'Yes, rated for three-way loading' : 'No'} />
            <Detail term="Material and gate" value={`${materialLabels[gear.material]} · ${gateLabels[gear.gate]}`} />
            <Detail term="Serial or lot" value={gear.serial} />
            <Detail term="Manufactured" value={fmt.day(gear.manufacturedOn, 'Not entered')} />
            <Detail term="In service since" value={fmt.day(gear.inServiceOn, 'Not entered')} />
            <Detail term="Service life" value={gear.serviceLifeYears === null ? 'Not entered' : `${gear.serviceLifeYears} years`} />
            {gear.notes ? <Detail term="Notes" value={gear.notes} /> : null}
          </dl>
          <Caution className="mt-3" />
        </Card>
      )}

      {isRigger ? <GearActions gear={gear} /> : null}
      <GearEvents events={gear.events} fmt={fmt} />
      <DocumentsPanel owner={{ type: 'gear', id: gear.id }} defaultKind="certificate" fmt={fmt} canUpload={canEdit} />
    </div>
  );
}
