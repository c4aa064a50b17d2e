export { ForgotPasswordScreen as default } from '@/features/auth/forgot-password-screen';
