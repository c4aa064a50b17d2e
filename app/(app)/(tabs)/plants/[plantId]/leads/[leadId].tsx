export { LeadScreen as default } from '@/features/leads/lead-screen';
