import { LARGE_SAMPLE_SIZE } from './constants.js';

/**
 * The remark for a sample size far beyond what tests of controls use (above
 * {@link LARGE_SAMPLE_SIZE}, common practice, no single source); undefined otherwise.
 */
export function sizeRemark(sampleSize: number): string | undefined {
  if (!(sampleSize > LARGE_SAMPLE_SIZE)) return undefined;
  return (
    `${sampleSize.toLocaleString('en-US')} items is far more than tests of controls usually use (common practice, no single ` +
    `source: rarely more than about ${LARGE_SAMPLE_SIZE}); the test may not be cost-effective. Consider a lower confidence, ` +
    'a higher tolerable rate, a lower planned reliance on the control, or other evidence.'
  );
}
