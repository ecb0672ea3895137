package pgserver

import (
	"context"
	"crypto/ecdsa"
	"crypto/elliptic"
	"crypto/rand"
	"crypto/tls"
	"crypto/x509"
	"crypto/x509/pkix"
	"encoding/pem"
	"math/big"
	"net"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"
)

// selfSigned writes a throwaway certificate and key for 127.0.0.1.
func selfSigned(t *testing.T) (string, string) {
	t.Helper()
	key, err := ecdsa.GenerateKey(elliptic.P256(), rand.Reader)
	if err != nil {
		t.Fatal(err)
	}
	tmpl := &x509.Certificate{
		SerialNumber: big.NewInt(1), Subject: pkix.Name{CommonName: "plumb test"},
		NotBefore: time.Now().Add(-time.Hour), NotAfter: time.Now().Add(time.Hour),
		IPAddresses: []net.IP{net.ParseIP("127.0.0.1")},
		KeyUsage:    x509.KeyUsageDigitalSignature, ExtKeyUsage: []x509.ExtKeyUsage{x509.ExtKeyUsageServerAuth},
	}
	der, err := x509.CreateCertificate(rand.Reader, tmpl, tmpl, &key.PublicKey, key)
	if err != nil {
		t.Fatal(err)
	}
	kder, err := x509.MarshalECPrivateKey(key)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	cert, keyFile := filepath.Join(dir, "cert.pem"), filepath.Join(dir, "key.pem")
	os.WriteFile(cert, pem.EncodeToMemory(&pem.Block{Type: "CERTIFICATE", Bytes: der}), 0o600)
	os.WriteFile(keyFile, pem.EncodeToMemory(&pem.Block{Type: "EC PRIVATE KEY", Bytes: kder}), 0o600)
	return cert, keyFile
}

// TestTLS: with a certificate the server accepts SSLRequest and serves
// over TLS; without one it refuses SSL politely, so sslmode=require fails
// and sslmode=prefer falls back to plain text.
func TestTLS(t *testing.T) {
	cert, key := selfSigned(t)
	ts := startServer(t, Config{TLSCert: cert, TLSKey: key})
	c, err := pgx.Connect(context.Background(), strings.Replace(ts.url("ana", "s3cret"), "sslmode=disable", "sslmode=require", 1))
	if err != nil {
		t.Fatalf("TLS connect: %v", err)
	}
	if _, ok := c.PgConn().Conn().(*tls.Conn); !ok {
		t.Errorf("the connection is %T, not TLS", c.PgConn().Conn())
	}
	var n int
	if err := c.QueryRow(context.Background(), "SELECT 5").Scan(&n); err != nil || n != 5 {
		t.Errorf("over TLS: %v", err)
	}
	c.Close(context.Background())

	plain := startServer(t, Config{})
	if _, err := pgx.Connect(context.Background(), strings.Replace(plain.url("ana", "s3cret"), "sslmode=disable", "sslmode=require", 1)); err == nil {
		t.Error("sslmode=require succeeded against a server without TLS")
	}
	c, err = pgx.Connect(context.Background(), strings.Replace(plain.url("ana", "s3cret"), "sslmode=disable", "sslmode=prefer", 1))
	if err != nil {
		t.Fatalf("sslmode=prefer without TLS: %v", err)
	}
	c.Close(context.Background())
}

// TestTLSRequired: with --tls-required a plaintext client is refused with
// a message saying why, a TLS client is served, and the flag without a
// certificate is a start-up error.
func TestTLSRequired(t *testing.T) {
	cert, key := selfSigned(t)
	ts := startServer(t, Config{TLSCert: cert, TLSKey: key, TLSRequired: true})
	_, err := pgx.Connect(context.Background(), ts.url("ana", "s3cret")) // sslmode=disable
	if err == nil || sqlStateOf(err) != stateInvalidAuthSpec || !strings.Contains(err.Error(), "TLS connections only") {
		t.Errorf("plaintext client: %v, want a 28000 error naming TLS", err)
	}
	c, err := pgx.Connect(context.Background(), strings.Replace(ts.url("ana", "s3cret"), "sslmode=disable", "sslmode=require", 1))
	if err != nil {
		t.Fatalf("TLS client: %v", err)
	}
	var n int
	if err := c.QueryRow(context.Background(), "SELECT 6").Scan(&n); err != nil || n != 6 {
		t.Errorf("over TLS: %v", err)
	}
	c.Close(context.Background())
	cfg := Config{Addr: "127.0.0.1:0", Users: map[string]string{"ana": "s3cret"}, TLSRequired: true}
	if err := cfg.Check(); err == nil || !strings.Contains(err.Error(), "--tls-required needs a certificate") {
		t.Errorf("--tls-required without a certificate: %v", err)
	}
}
