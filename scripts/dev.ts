// `npm run dev`: the API with reload (tsx watch) and Vite's dev server with hot reload, side by side.
import { spawn } from 'node:child_process';

const env = { ...process.env, APP_URL: process.env.APP_URL ?? 'http://127.0.0.1:5173' };
const children = [
  spawn('npx', ['tsx', 'watch', '--clear-screen=false', 'server/index.ts'], { stdio: 'inherit', env }),
  spawn('npx', ['vite'], { stdio: 'inherit', env }),
];
const stop = () => {
  for (const c of children) c.kill('SIGTERM');
  process.exit(0);
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
for (const c of children) c.on('exit', (code) => code && stop());
