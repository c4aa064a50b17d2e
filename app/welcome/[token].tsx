export { WelcomeScreen as default } from '@/features/auth/welcome-screen';
