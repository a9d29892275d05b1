import { StemwiseError } from '@stemwise/platform';
import type { Runtime } from '../runtime';

export const summary = 'not yet available';

export async function run(_args: string[], _rt: Runtime): Promise<number> {
  throw new StemwiseError('not_yet', "'stemwise serve' is not available yet in this version");
}
