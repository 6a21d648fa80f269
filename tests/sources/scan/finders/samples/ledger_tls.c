/* Key handling of a fictional ledger service (sample for the source-code finder). */
#include <openssl/evp.h>
#include <openssl/rsa.h>
#include <openssl/ssl.h>

#define LEGACY_BITS 1024

int configure(SSL_CTX *ctx, EVP_PKEY_CTX *keygen, int bits)
{
    const EVP_CIPHER *wrap = EVP_des_ede3_cbc();
    const EVP_MD *digest = EVP_sha1();
    EVP_PKEY_CTX_set_rsa_keygen_bits(keygen, LEGACY_BITS);
    EVP_PKEY_CTX_set_rsa_keygen_bits(keygen, bits);
    return SSL_CTX_set_cipher_list(ctx, "RC4-SHA:DES-CBC3-SHA") + (wrap != NULL) + (digest != NULL);
}
