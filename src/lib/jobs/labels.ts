import type { ExposureReason, ExposureStatus, UrgencyLevel } from '$lib/domain/exposure';

/** Short names for assessExposure's statuses; the explanation carries the detail. */
export const exposureStatusLabels: Record<ExposureStatus, string> = {
	within: 'Within the rating',
	exceeded: 'Beyond the rating',
	'outside-test-conditions': 'Outside the test conditions',
	undetermined: 'Cannot tell yet',
	'invalid-rating': 'Rating cannot be right'
};

export const exposureReasonLabels: Record<ExposureReason, string> = {
	depth: 'too deep',
	duration: 'too long',
	liquid: 'not fresh water',
	'no-immersion-rating': 'no immersion rating',
	temperature: 'warmer than the phone',
	motion: 'moving water or a jet',
	detergent: 'soap or detergent'
};

export const urgencyLabels: Record<UrgencyLevel, string> = {
	low: 'Low',
	elevated: 'Elevated',
	high: 'High',
	critical: 'Critical'
};

/** Tone classes per status: each status also has its own icon and words, never colour alone. */
export const exposureTone: Record<ExposureStatus, string> = {
	within: 'bg-ok-bg text-ok',
	exceeded: 'bg-danger-bg text-danger',
	'outside-test-conditions': 'bg-caution-bg text-caution',
	undetermined: 'bg-sunken text-text',
	'invalid-rating': 'bg-danger-bg text-danger'
};
