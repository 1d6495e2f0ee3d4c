import { TodayPage } from '../../../features/today/today-page';

export default function TodayRoute() {
  return <TodayPage />;
}
