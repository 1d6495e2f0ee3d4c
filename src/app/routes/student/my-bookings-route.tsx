import { MyBookingsPage } from '../../../features/student-portal/my-bookings-page';
export default function MyBookingsRoute() {
  return <MyBookingsPage />;
}
