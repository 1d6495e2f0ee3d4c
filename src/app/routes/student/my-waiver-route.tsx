import { WaiverPage } from '../../../features/student-portal/waiver-page';
export default function MyWaiverRoute() {
  return <WaiverPage />;
}
