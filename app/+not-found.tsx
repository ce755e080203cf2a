/** Unknown address: say so plainly and offer the way home. */
import { NotFoundScreen } from '../components/ui/not-found-screen';

export default function NotFoundRoute() {
  return <NotFoundScreen />;
}
