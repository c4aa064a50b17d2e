export { InviteScreen as default } from '@/features/invitations/invite-screen';
