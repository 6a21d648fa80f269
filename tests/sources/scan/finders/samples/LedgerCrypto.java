import java.security.KeyPairGenerator;
import java.security.MessageDigest;
import java.security.Signature;
import javax.crypto.Cipher;

/** Key handling of a fictional ledger service (sample for the source-code finder). */
public class LedgerCrypto {
    static final int BITS = 1024;
    static final String WRAP = "DESede/CBC/PKCS5Padding";

    public static void main(String[] args) throws Exception {
        KeyPairGenerator generator = KeyPairGenerator.getInstance("RSA");
        generator.initialize(BITS);
        Cipher wrap = Cipher.getInstance(WRAP);
        Signature signer = Signature.getInstance("SHA1withRSA");
        MessageDigest digest = MessageDigest.getInstance(args.length > 0 ? args[0] : "SHA-256");
        System.out.println(generator.getAlgorithm() + wrap.getAlgorithm() + signer.getAlgorithm() + digest.getAlgorithm());
    }
}
