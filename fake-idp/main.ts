/** Runs the local identity provider on its own: `npx tsx fake-idp/main.ts`. */
import { startIdp } from './provider.js';

const port = Number(process.env.IDP_PORT ?? 3001);
const appOrigins = (process.env.APP_ORIGINS ?? process.env.APP_ORIGIN ?? 'http://localhost:3000').split(',');
const idp = await startIdp({ port, appOrigins, issuer: process.env.OIDC_ISSUER });
console.log(`identity provider on ${idp.issuer}`);
