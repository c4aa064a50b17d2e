export { SignUpScreen as default } from '@/features/auth/sign-up-screen';
