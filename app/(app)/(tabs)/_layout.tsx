export { AppTabs as default } from '@/features/navigation/app-tabs';
