export { PlantScreen as default } from '@/features/plants/plant-screen';
