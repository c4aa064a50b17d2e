import { Redirect, Slot } from 'expo-router';
import { useMeQuery } from '@/api/queries/session';
import { FullScreenMessage } from '@/features/navigation/full-screen-message';

export default function AuthLayout() {
  const me = useMeQuery();
  if (me.isPending) return <FullScreenMessage loading message="Checking your session…" />;
  if (me.data) return <Redirect href="/" />;
  return <Slot />;
}
