// The reefd command run from the TypeScript sources (through tsx), so the end-to-end tests and the
// daemon benchmark exercise the code as it is now, with no `npm run build` in between. Same entry as
// bin/reefd.js, which runs the compiled copy of this module.
import { main } from '../../../services/cli/main.js';

process.exitCode = await main(process.argv.slice(2));
