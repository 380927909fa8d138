// `npm run db:up` / `npm run db:down`: the development cluster alone.
import { prepareDatabase } from './setup';

const cluster = await prepareDatabase({ name: 'pg', port: 54329, database: 'levelwire' });
if (process.argv[2] === 'down') cluster.stop();
else console.log(`DATABASE_URL=${cluster.url}`);
