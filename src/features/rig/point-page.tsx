import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { ClipboardCheck, Pencil, Printer, TriangleAlert, Workflow } from 'lucide-react';
import type { Point } from '../../../shared/schemas/rig';
import { gearInspectionsNeeded, pointInspectionHelps } from '../../../shared/clearance/gear-standing';
import { gearKindLabels } from '../../../shared/rigging/strength';
import { Button } from '../../components/ui/button';
import { Card, ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { ApiError } from '../../lib/api-client';
import { paths } from '../../lib/paths';
import { rigQueries, type ClassType } from './api';
import { useRigAccess } from './access';
import { BackLink } from './components/back-link';
import { apparatusLabel, structureLabels, type StudioFormat } from './format';
import { useStudioFormat } from './use-studio-format';
import { ClassLoadChecks } from './components/class-load-checks';
import { DocumentsPanel } from './components/documents-panel';
import { LoadPathChain } from './components/link-card';
import { LoadPathEditor, type SaveOutcome } from './components/load-path-editor';
import { PointForm } from './components/point-form';
import { PointStatusPanel } from './components/point-status-panel';
import { MountApparatus } from './components/mount-apparatus';
import { Detail } from './components/detail';

const linkButton = 'inline-flex min-h-11 items-center gap-2 rounded-lg border border-line bg-white px-4 py-2 text-sm font-medium hover:bg-pine-50';

export function PointPage({ id }: { id: number }) {
  const point = useQuery(rigQueries.point(id));
  const classTypes = useQuery(rigQueries.classTypes());
  const { studio, fmt } = useStudioFormat();
  const active = useMemo(() => classTypes.data?.filter((c) => c.active) ?? [], [classTypes.data]);
  const failed = point.error ?? studio.error;
  if (failed) {
    const missing = failed instanceof ApiError && failed.status === 404;
    return (
      <div className="max-w-5xl space-y-4">
        <BackLink to={paths.rig}>Rig</BackLink>
        {missing ? <ErrorState error={new Error('There is no rigging point with this number. It may have been removed; go back to the rig register.')} /> : <ErrorState error={failed} retry={() => { void point.refetch(); void studio.refetch(); }} />}
      </div>
    );
  }
  if (!point.data || !fmt) return <Loading label="Loading the point…" />;
  return <PointView point={point.data} fmt={fmt} classTypes={active} classTypesError={classTypes.error} classTypesPending={classTypes.isPending} />;
}

function PointView({ point, fmt, classTypes, classTypesError, classTypesPending }: { point: Point; fmt: StudioFormat; classTypes: ClassType[]; classTypesError: unknown; classTypesPending: boolean }) {
  const { canEdit, isRigger } = useRigAccess();
  const rooms = useQuery({ ...rigQueries.rooms(), enabled: canEdit });
  const [editingPoint, setEditingPoint] = useState(false);
  const [editingPath, setEditingPath] = useState(false);
  const [saved, setSaved] = useState<SaveOutcome | null>(null);
  const links = point.links ?? [];
  // A point blocked by its gear is released by that item's own inspection (a quarantined hoop by its after-incident one), not by the point's.
  const gearNeeds = point.status.status === 'blocked' ? gearInspectionsNeeded(links, new Date()) : [];
  return (
    <div className="max-w-5xl space-y-6">
      <BackLink to={paths.rig}>Rig</BackLink>
      <PageHeader
        title={`Point ${point.label}`}
        actions={
          <>
            <Link to={paths.reportFault({ pointId: point.id })} className={linkButton}><TriangleAlert className="size-4" aria-hidden /> Report a fault</Link>
            {isRigger ? gearNeeds.map((g) => <Link key={g.gearId} to={paths.inspectGear(g.gearId)} className={linkButton}><ClipboardCheck className="size-4" aria-hidden /> Inspect {gearKindLabels[g.kind].toLowerCase()} {g.serial}</Link>) : null}
            {isRigger && pointInspectionHelps(point.status) ? <Link to={paths.inspectPoint(point.id)} className={linkButton}><ClipboardCheck className="size-4" aria-hidden /> Inspect and clear</Link> : null}
            <Link to={`${paths.labels}?point=${point.id}`} className="inline-flex min-h-11 items-center gap-2 rounded-lg border border-line bg-white px-4 py-2 text-sm font-medium hover:bg-pine-50"><Printer className="size-4" aria-hidden /> Print its label</Link>
            {canEdit && !editingPoint ? <Button variant="secondary" onClick={() => setEditingPoint(true)}><Pencil className="size-4" aria-hidden /> Edit point</Button> : null}
          </>
        }
      >
        {point.roomName} · {structureLabels[point.structure]}
      </PageHeader>

      <PointStatusPanel point={point} fmt={fmt} saved={saved} />

      {editingPoint && rooms.data ? (
        <PointForm rooms={rooms.data} point={point} onDone={() => setEditingPoint(false)} />
      ) : editingPoint && rooms.isError ? (
        <ErrorState error={rooms.error} retry={() => rooms.refetch()} />
      ) : editingPoint ? <Loading /> : (
        <Card>
          <h2 className="mb-3 font-semibold">Details</h2>
          <dl className="grid gap-x-6 gap-y-2 text-sm sm:grid-cols-2">
            <Detail term="Room" value={point.roomName} />
            <Detail term="Structure" value={structureLabels[point.structure]} />
            <Detail term="Structural rating" value={`${fmt.force(point.structuralRatingKn)} (engineer’s allowable load)`} />
            <Detail term="Most performers at once" value={String(point.maxPerformers)} />
            <Detail term="Apparatus allowed" value={point.apparatus.length ? point.apparatus.map(apparatusLabel).join(', ') : 'None yet'} />
            <Detail term="Service" value={point.inService ? 'In service' : 'Out of service'} />
            {point.notes ? <Detail term="Notes" value={point.notes} /> : null}
          </dl>
        </Card>
      )}

      <Card className="space-y-4">
        <div className="flex flex-wrap items-center justify-between gap-2">
          <h2 className="font-semibold">Load path</h2>
          {canEdit && !editingPath ? (
            <Button variant="secondary" onClick={() => { setEditingPath(true); setSaved(null); }}><Workflow className="size-4" aria-hidden /> Edit load path</Button>
          ) : null}
        </div>
        {editingPath ? (
          <LoadPathEditor point={point} fmt={fmt} classTypes={classTypes} onDone={(outcome) => { setEditingPath(false); if (outcome) setSaved(outcome); }} />
        ) : (
          <>
            <LoadPathChain links={links} structure={point.structure} ratingKn={point.structuralRatingKn} fmt={fmt} />
            {isRigger && links.length > 0 ? <MountApparatus point={point} /> : null}
          </>
        )}
      </Card>

      <Card className="space-y-3">
        <div>
          <h2 className="font-semibold">Load check of the saved path, per class</h2>
          <p className="text-sm text-muted">As the server works it out for booking. Open a class to see the figures, the findings and the arithmetic.</p>
        </div>
        {classTypesError ? <ErrorState error={classTypesError} /> : classTypesPending ? <Loading label="Loading class types…" /> : <ClassLoadChecks point={point} classTypes={classTypes} fmt={fmt} />}
      </Card>

      <DocumentsPanel owner={{ type: 'points', id: point.id }} defaultKind="assessment" fmt={fmt} canUpload={canEdit} />
    </div>
  );
}
