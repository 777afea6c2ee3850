/**
 * Answers that walk the shipped restart-loop flow (flows/restart-loop-after-liquid.flow.yaml) from
 * its start to "clean-and-dry", whose "dry longer and test again" answer (outcome 1) stays on the
 * step: from there ANSWER and BACK can follow each other for ever. Specs and benchmarks use it.
 */
export const restartLoopFlow = 'restart-loop-after-liquid';

export const toCleanAndDry = [
	['power-on-as-received', 0], // Restarts again and again
	['open-and-disconnect', 1], // Battery looks normal and is disconnected
	['inspect-front-area', 0], // Corrosion or residue seen and photographed
	['isolate-front-flex', 1], // Still restarts or sits in the recovery screen
	['isolate-other-modules', 1] // Still restarts whichever module is unplugged
] as const;

/** The step the walk ends on, and its answer that stays there ("dry longer and test again"). */
export const loopStep = 'clean-and-dry';
export const dryLonger = 1;
