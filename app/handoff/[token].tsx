export { HandoffScreen as default } from '@/features/handoffs/handoff-screen';
