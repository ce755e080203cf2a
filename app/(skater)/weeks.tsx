import { MyWeeksScreen } from '../../components/my-weeks/my-weeks-screen';

export default function WeeksRoute() {
  return <MyWeeksScreen />;
}
