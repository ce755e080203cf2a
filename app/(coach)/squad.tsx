import { SquadScreen } from '../../components/squad/squad-screen';

export default function SquadRoute() {
  return <SquadScreen />;
}
