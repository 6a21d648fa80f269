// Key handling of a fictional ledger service (sample for the source-code finder).
use md5::{Digest, Md5};
use rsa::RsaPrivateKey;

const BITS: usize = 1024;

fn main() {
    let mut rng = rand::thread_rng();
    let key = RsaPrivateKey::new(&mut rng, BITS);
    let digest = Md5::new();
    let agreement = &ring::agreement::X25519;
    let tls = &rustls::version::TLS12;
    println!("{:?} {:?} {:?} {:?}", key.is_ok(), digest, agreement, tls);
}
