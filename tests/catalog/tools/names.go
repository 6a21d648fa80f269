// Prints the String() of the Go standard library's signature, public key and TLS curve constants,
// one "CONSTANT<TAB>STRING" per line, for pqtriage's identifier tests.
package main

import (
	"crypto/tls"
	"crypto/x509"
	"fmt"
)

func main() {
	signatures := map[string]x509.SignatureAlgorithm{
		"MD2WithRSA": x509.MD2WithRSA, "MD5WithRSA": x509.MD5WithRSA, "SHA1WithRSA": x509.SHA1WithRSA,
		"SHA256WithRSA": x509.SHA256WithRSA, "SHA384WithRSA": x509.SHA384WithRSA, "SHA512WithRSA": x509.SHA512WithRSA,
		"DSAWithSHA1": x509.DSAWithSHA1, "DSAWithSHA256": x509.DSAWithSHA256, "ECDSAWithSHA1": x509.ECDSAWithSHA1,
		"ECDSAWithSHA256": x509.ECDSAWithSHA256, "ECDSAWithSHA384": x509.ECDSAWithSHA384,
		"ECDSAWithSHA512": x509.ECDSAWithSHA512, "SHA256WithRSAPSS": x509.SHA256WithRSAPSS,
		"SHA384WithRSAPSS": x509.SHA384WithRSAPSS, "SHA512WithRSAPSS": x509.SHA512WithRSAPSS,
		"PureEd25519": x509.PureEd25519,
	}
	for name, value := range signatures {
		fmt.Printf("%s\t%s\n", name, value.String())
	}
	keys := map[string]x509.PublicKeyAlgorithm{"RSA": x509.RSA, "DSA": x509.DSA, "ECDSA": x509.ECDSA, "Ed25519": x509.Ed25519}
	for name, value := range keys {
		fmt.Printf("key.%s\t%s\n", name, value.String())
	}
	curves := map[string]tls.CurveID{"CurveP256": tls.CurveP256, "CurveP384": tls.CurveP384, "CurveP521": tls.CurveP521, "X25519": tls.X25519}
	for name, value := range curves {
		fmt.Printf("curve.%s\t%s\n", name, value.String())
	}
}
