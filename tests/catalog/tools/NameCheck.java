import java.security.*;
import java.security.spec.*;
import java.io.*;
import java.util.*;

/** Reads lines "TYPE<TAB>NAME<TAB>OID" and prints, for each, the provider's own name for the OID. */
public class NameCheck {
  public static void main(String[] args) throws Exception {
    BufferedReader in = new BufferedReader(new InputStreamReader(System.in, "UTF-8"));
    String line;
    while ((line = in.readLine()) != null) {
      String[] f = line.split("\t");
      String type = f[0], name = f[1], oid = f.length > 2 ? f[2] : "";
      String byOid = "-", byName = "-";
      if (type.equals("Curve")) {
        try {
          AlgorithmParameters p = AlgorithmParameters.getInstance("EC");
          p.init(new ECGenParameterSpec(name));
          byName = p.getParameterSpec(ECGenParameterSpec.class).getName();
        } catch (Exception e) { byName = "!" + e.getClass().getSimpleName(); }
      } else {
        for (Provider p : Security.getProviders()) {
          Provider.Service s = p.getService(type, name);
          if (s != null && byName.equals("-")) byName = s.getAlgorithm();
          if (!oid.isEmpty()) {
            Provider.Service o = p.getService(type, oid);
            if (o != null && byOid.equals("-")) byOid = o.getAlgorithm();
          }
        }
      }
      System.out.println(type + "\t" + name + "\t" + oid + "\t" + byName + "\t" + byOid);
    }
  }
}
