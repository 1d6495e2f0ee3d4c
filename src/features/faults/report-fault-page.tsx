import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { ArrowLeft } from 'lucide-react';
import { Card, PageHeader } from '../../components/ui/states';
import { paths } from '../../lib/paths';
import { ReportFaultForm } from './components/report-fault-form';

const idOf = (v: string | null) => {
  const n = Number(v);
  return v && Number.isInteger(n) && n > 0 ? n : undefined;
};

/** /faults/new?pointId=ID or ?gearId=ID: where a point's or gear item's "Report a fault" (and its QR label) leads. */
export function ReportFaultPage() {
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const gearId = idOf(params.get('gearId'));
  const pointId = gearId === undefined ? idOf(params.get('pointId')) : undefined;
  const back = () => (window.history.length > 1 ? navigate(-1) : navigate(paths.faults));
  return (
    <div className="mx-auto max-w-xl">
      <Link to={paths.faults} className="no-print mb-3 inline-flex min-h-11 items-center gap-1 text-sm font-medium text-pine-700 hover:underline">
        <ArrowLeft className="size-4" aria-hidden /> All faults
      </Link>
      <PageHeader title="Report a fault">Something looks wrong? Tell the rigger. The point is blocked the moment you send this.</PageHeader>
      <Card>
        <ReportFaultForm key={`${pointId}-${gearId}`} pointId={pointId} gearId={gearId} onDone={() => navigate(paths.faults)} onCancel={back} />
      </Card>
    </div>
  );
}
