import { ReviewScreen } from '../../components/review/review-screen';

export default function ReviewRoute() {
  return <ReviewScreen />;
}
