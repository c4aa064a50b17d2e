import { Stack } from 'expo-router';

export default function PlantsLayout() {
  return <Stack screenOptions={{ headerShown: false }} />;
}
