import { ClockScreen } from '../../components/clock/clock-screen';

export default function ClockRoute() {
  return <ClockScreen />;
}
