export { RoundsScreen as default } from '@/features/rounds/rounds-screen';
