/** The program as `bin/skytally.js` runs it, from the sources (for tests that need a real process). */
import { main } from '../../src/cli/main.js';

await main();
