// Entry of the bundled command line (bin/orrery.js builds it with esbuild; see scripts/build-cli.mjs).
import { main } from './orrery.js';
import { runPush } from './push.js';

const argv = process.argv.slice(2);
// push talks to a server, so it is the one asynchronous command.
if (argv[0] === 'push') void runPush(argv.slice(1)).then((code) => (process.exitCode = code));
else process.exitCode = main(argv);
