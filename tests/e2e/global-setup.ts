import { ensureWebBuild } from '../../scripts/web-build';
import { assertChromium } from '../helpers/chromium';

/** Browser tests need Chromium and a current web export; say so in one line when one is missing. */
export default async function setup() {
  assertChromium();
  await ensureWebBuild();
}
