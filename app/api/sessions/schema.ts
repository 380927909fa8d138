export { openSessionInput } from '@/lib/session/commands';
