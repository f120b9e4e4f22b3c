// TLS files from the configuration (ca/cert/key, verify) turned into node:tls options, read once at
// start-up. Shared by every transport: HTTP outputs, MQTT intake, Kafka intake and outputs.
import { readFileSync } from 'node:fs';
import type { RequestOptions } from 'node:https';

export interface TlsFiles {
  ca_file?: string | undefined;
  cert_file?: string | undefined;
  key_file?: string | undefined;
  verify?: boolean | undefined;
}

export type TlsOptions = Pick<RequestOptions, 'ca' | 'cert' | 'key' | 'rejectUnauthorized'>;

/** TLS options for node:https / node:tls from the configuration's file names (read once, at start-up). */
export function tlsOptions(tls: TlsFiles | undefined): TlsOptions {
  if (tls === undefined) return {};
  const o: TlsOptions = { rejectUnauthorized: tls.verify ?? true };
  if (tls.ca_file !== undefined) o.ca = readFileSync(tls.ca_file);
  if (tls.cert_file !== undefined) o.cert = readFileSync(tls.cert_file);
  if (tls.key_file !== undefined) o.key = readFileSync(tls.key_file);
  return o;
}
