// `npm run dev`: the API (as `npm start` runs it, without the production build) and Vite's dev server
// on http://127.0.0.1:5173 with /api proxied to it.
import { startChild, vite } from './lib.mjs';

const apiPort = process.env.PORT ?? '3000';
const api = startChild('API', process.execPath, ['backend/scripts/start.mjs'], { PORT: apiPort, SKIP_BUILD: '1' });
const web = startChild('Vite', vite, ['--host', '127.0.0.1', '--port', '5173'], { API_PORT: apiPort });
const stop = () => {
  web.kill('SIGTERM');
  api.kill('SIGINT');
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
api.on('exit', () => web.kill('SIGTERM'));
