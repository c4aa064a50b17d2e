export { ImportScreen as default } from '@/features/import/import-screen';
