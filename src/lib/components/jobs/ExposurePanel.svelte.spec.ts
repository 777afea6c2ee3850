import { render, screen } from '@testing-library/svelte';
import { describe, expect, it } from 'vitest';
import ExposurePanel from './ExposurePanel.svelte';

const now = new Date('2026-03-01T12:00:00Z');
const hoursBefore = (h: number) => new Date(now.getTime() - h * 3_600_000);

describe('ExposurePanel', () => {
	it('says "beyond the rating" with reasons when IP67 meets 2 m (IEC 60529 digit 7: 1 m for 30 min)', () => {
		render(ExposurePanel, {
			rating: { code: 'IP67' },
			exposure: { liquid: 'fresh', submerged: true, depthM: 2, minutes: 10 },
			exposedAt: hoursBefore(2),
			now
		});
		const status = screen.getByText('Beyond the rating').closest('[data-status]');
		expect(status).toHaveAttribute('data-status', 'exceeded');
		expect(screen.getByRole('list', { name: 'Why' })).toHaveTextContent('too deep');
		expect(screen.getByText(/2 m is deeper than 1 m/)).toBeInTheDocument();
	});

	it('judges nothing until the liquid is chosen at intake', () => {
		render(ExposurePanel, {
			rating: { code: null },
			exposure: { liquid: 'unknown', submerged: false },
			exposedAt: null,
			now,
			awaiting: 'Choose the liquid first.'
		});
		expect(screen.getByTestId('exposure-awaiting')).toHaveTextContent('Choose the liquid first.');
		expect(screen.queryByTestId('urgency')).toBeNull();
		expect(document.querySelector('[data-status]')).toBeNull();
	});

	it('shows "cannot tell yet" for IP68 without the maker’s declaration', () => {
		render(ExposurePanel, {
			rating: { code: 'IP68' },
			exposure: { liquid: 'fresh', submerged: true, depthM: 1, minutes: 5 },
			exposedAt: null,
			now
		});
		expect(screen.getByText('Cannot tell yet').closest('[data-status]')).toHaveAttribute(
			'data-status',
			'undetermined'
		);
		expect(screen.getByText(/declared depth and minutes, which are missing/)).toBeInTheDocument();
	});

	it('marks the urgency hint as common practice and raises it for salt water after a day', () => {
		render(ExposurePanel, {
			rating: { code: null },
			exposure: { liquid: 'salt', submerged: false },
			exposedAt: hoursBefore(30),
			now
		});
		const urgency = screen.getByTestId('urgency');
		// Salt (+2) and 24–72 h of waiting (+2) is the top band of urgencyHint (common practice, no published source).
		expect(urgency).toHaveAttribute('data-level', 'critical');
		expect(urgency).toHaveTextContent('common practice');
		expect(urgency).toHaveTextContent('30 h ago');
	});

	it('shows the stored assessment on the job page rather than recomputing it', () => {
		render(ExposurePanel, {
			rating: { code: 'IP67' },
			exposure: { liquid: 'fresh', submerged: true, depthM: 0.5, minutes: 5 },
			exposedAt: null,
			now,
			stored: { status: 'exceeded', reasons: ['duration'], explanation: 'Stored at intake.' }
		});
		expect(screen.getByText('Stored at intake.')).toBeInTheDocument();
		expect(screen.getByText('Beyond the rating')).toBeInTheDocument();
	});

	it('asks for numbers instead of failing when a reading is not a number yet', () => {
		render(ExposurePanel, {
			rating: { code: 'IP67' },
			exposure: { liquid: 'fresh', submerged: true, depthM: Number.NaN, minutes: 5 },
			exposedAt: null,
			now
		});
		expect(screen.getByText(/Enter the depth and time as numbers/)).toBeInTheDocument();
	});

	it('explains in words why warm, moving water is outside the test conditions (IEC 60529 digit 7/8: within 5 K, at rest)', () => {
		render(ExposurePanel, {
			rating: { code: 'IP67' },
			exposure: {
				liquid: 'fresh',
				submerged: true,
				depthM: 0.5,
				minutes: 5,
				temperature: 'warm',
				motion: 'moving',
				soapy: false
			},
			exposedAt: null,
			now
		});
		expect(screen.getByText('Outside the test conditions').closest('[data-status]')).toHaveAttribute(
			'data-status',
			'outside-test-conditions'
		);
		const why = screen.getByRole('list', { name: 'Why' });
		expect(why).toHaveTextContent('warmer than the phone');
		expect(why).toHaveTextContent('moving water or a jet');
		expect(screen.getByText(/more than 5 K warmer than the phone/)).toBeInTheDocument();
	});

	it('says an IP69 is a jet test, not an immersion rating', () => {
		render(ExposurePanel, {
			rating: { code: 'IP69' },
			exposure: { liquid: 'fresh', submerged: true, depthM: 0.2, minutes: 1 },
			exposedAt: null,
			now
		});
		expect(screen.getByText('Beyond the rating')).toBeInTheDocument();
		expect(
			screen.getByText(/second digit 9 is a high-pressure, high-temperature jet test/)
		).toBeInTheDocument();
	});
});
