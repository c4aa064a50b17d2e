export { PlantsScreen as default } from '@/features/plants/plants-screen';
