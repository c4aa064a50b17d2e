export { ResetPasswordScreen as default } from '@/features/auth/reset-password-screen';
