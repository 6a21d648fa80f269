// Key handling of a fictional ledger service (sample for the source-code finder).
package main

import (
	"crypto/ecdsa"
	"crypto/elliptic"
	"crypto/md5"
	"crypto/rand"
	"crypto/rsa"
	"crypto/tls"
	"fmt"
)

const bits = 1024

func main() {
	key, _ := rsa.GenerateKey(rand.Reader, bits)
	signer, _ := ecdsa.GenerateKey(elliptic.P224(), rand.Reader)
	config := &tls.Config{
		MinVersion:       tls.VersionTLS10,
		CipherSuites:     []uint16{tls.TLS_RSA_WITH_3DES_EDE_CBC_SHA},
		CurvePreferences: []tls.CurveID{tls.X25519},
	}
	fmt.Println(key.N.BitLen(), signer.Curve.Params().Name, md5.Sum([]byte("x")), config.MinVersion)
}
