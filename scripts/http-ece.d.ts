// Types for http_ece 1.2 (encrypted content coding, RFC 8188), the part the push fake and tests use.
declare module "http_ece" {
  import type { ECDH } from "node:crypto";
  export function decrypt(buffer: Buffer, params: { version?: "aes128gcm"; privateKey?: ECDH; authSecret?: string; key?: string }): Buffer;
  export function encrypt(buffer: Buffer, params: { version?: "aes128gcm"; privateKey?: ECDH; dh?: string; authSecret?: string; keyid?: string }): Buffer;
}
