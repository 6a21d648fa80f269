// Key handling of a fictional ledger service (sample for the source-code finder).
const crypto = require('crypto');

const CIPHER = 'des-ede3-cbc';
const { publicKey } = crypto.generateKeyPairSync('rsa', { modulusLength: 1024 });
const cipher = crypto.createCipheriv(CIPHER, crypto.randomBytes(24), crypto.randomBytes(8));
const digest = crypto.createHash('sha1').update('ledger').digest('hex');
const hmac = crypto.createHmac(process.argv[2] || 'sha256', 'key');
console.log(publicKey.asymmetricKeyType, cipher.update('x').length, digest.length, typeof hmac);
