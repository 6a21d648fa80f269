// Key handling of a fictional ledger service (sample for the source-code finder).
export async function makeKeys(): Promise<CryptoKeyPair> {
  const digest: ArrayBuffer = await crypto.subtle.digest('SHA-1', new Uint8Array([1, 2]));
  console.log(digest.byteLength);
  return crypto.subtle.generateKey(
    { name: 'ECDSA', namedCurve: 'P-384' },
    true,
    ['sign', 'verify'],
  ) as Promise<CryptoKeyPair>;
}
