import { Redirect } from 'expo-router';
import { HOME } from '@/components/shell/navigation';
import { useSession } from '@/hooks/use-session';

/** `/` sends each role to the screen of its daily job. */
export default function Home() {
  const { session } = useSession();
  if (!session) return null;
  return <Redirect href={HOME[session.user.role]} />;
}
