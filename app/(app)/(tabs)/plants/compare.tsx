export { CompareScreen as default } from '@/features/compare/compare-screen';
