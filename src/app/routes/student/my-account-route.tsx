import { MyAccountPage } from '../../../features/student-portal/my-account-page';
export default function MyAccountRoute() {
  return <MyAccountPage />;
}
