export { CollectionScreen as default } from '@/features/collections/collection-screen';
