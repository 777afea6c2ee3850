// Same values as mailStatuses in $lib/server/db/schema/mail.ts (client code may not import server modules).
type MailStatus = 'queued' | 'sending' | 'sent' | 'failed';

export const mailStatusLabels: Record<MailStatus, string> = {
	queued: 'Queued',
	sending: 'Sending',
	sent: 'Sent',
	failed: 'Failed'
};

/** Colour and words together, so the status never rests on colour alone. */
export const mailStatusTone: Record<MailStatus, string> = {
	queued: 'bg-caution-bg text-caution',
	sending: 'bg-sunken text-text',
	sent: 'bg-ok-bg text-ok',
	failed: 'bg-danger-bg text-danger'
};
