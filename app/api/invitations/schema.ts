export { acceptInvitationInput, invitationInput } from '@/lib/fleet/invitations';
