export { NewPlantScreen as default } from '@/features/plants/new-plant-screen';
