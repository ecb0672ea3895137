package pgserver

import (
	"crypto/hmac"
	"crypto/rand"
	"crypto/sha256"
	"fmt"

	"github.com/jackc/pgx/v5/pgproto3"
	"github.com/xdg-go/scram"
)

// scramIterations is the PBKDF2 iteration count of every verifier, real or
// mock (PostgreSQL's default scram_iterations).
const scramIterations = 4096

// credentials holds SCRAM-SHA-256 verifiers (RFC 5802, RFC 7677) derived
// once from the configured passwords; the passwords themselves are not kept.
type credentials struct {
	users map[string]scram.StoredCredentials
	// mock is a per-process random secret from which unknown users'
	// challenges are derived.
	mock []byte
}

func newCredentials(users map[string]string) (credentials, error) {
	out := credentials{users: map[string]scram.StoredCredentials{}, mock: make([]byte, 32)}
	if _, err := rand.Read(out.mock); err != nil {
		return credentials{}, err
	}
	for user, password := range users {
		salt := make([]byte, 16)
		if _, err := rand.Read(salt); err != nil {
			return credentials{}, err
		}
		client, err := scram.SHA256.NewClient(user, password, "")
		if err != nil {
			return credentials{}, fmt.Errorf("user %s: %w", user, err)
		}
		out.users[user] = client.GetStoredCredentials(scram.KeyFactors{Salt: string(salt), Iters: scramIterations})
	}
	return out, nil
}

// lookup returns user's verifier, or for an unknown user a mock one, as
// PostgreSQL's scram_mock_salt does: its salt is an HMAC-SHA256 of the name
// under the process's secret, so it is the same every time for one name,
// differs between names, and looks like a real user's (16 bytes, the same
// iteration count); its keys match no password.
func (c credentials) lookup(user string) (scram.StoredCredentials, bool) {
	if stored, ok := c.users[user]; ok {
		return stored, true
	}
	derive := func(purpose string) []byte {
		h := hmac.New(sha256.New, c.mock)
		h.Write([]byte(purpose + "\x00" + user))
		return h.Sum(nil)
	}
	return scram.StoredCredentials{
		KeyFactors: scram.KeyFactors{Salt: string(derive("salt")[:16]), Iters: scramIterations},
		StoredKey:  derive("stored key"),
		ServerKey:  derive("server key"),
	}, false
}

// errLogin is a failed login: wrong password, unknown user or none given.
type errLogin struct{ reason string }

func (e errLogin) Error() string { return e.reason }

// scramLogin runs the SCRAM-SHA-256 exchange for user over the backend. An
// unknown user goes through the same exchange with a verifier nobody can
// match, so a client cannot tell unknown users from wrong passwords.
func scramLogin(be *pgproto3.Backend, creds credentials, user string) error {
	stored, known := creds.lookup(user)
	// PostgreSQL clients leave the SCRAM user name empty and rely on the
	// startup user, so the lookup ignores the name in the message.
	server, err := scram.SHA256.NewServer(func(string) (scram.StoredCredentials, error) { return stored, nil })
	if err != nil {
		return err
	}
	conv := server.NewConversation()
	be.Send(&pgproto3.AuthenticationSASL{AuthMechanisms: []string{"SCRAM-SHA-256"}})
	if err := be.Flush(); err != nil {
		return err
	}
	if err := be.SetAuthType(pgproto3.AuthTypeSASL); err != nil {
		return err
	}
	msg, err := be.Receive()
	if err != nil {
		return err
	}
	initial, ok := msg.(*pgproto3.SASLInitialResponse)
	if !ok {
		return errLogin{"expected a SASL initial response"}
	}
	if initial.AuthMechanism != "SCRAM-SHA-256" {
		return errLogin{"unsupported SASL mechanism " + initial.AuthMechanism}
	}
	challenge, err := conv.Step(string(initial.Data))
	if err != nil {
		return errLogin{"malformed SCRAM message"}
	}
	be.Send(&pgproto3.AuthenticationSASLContinue{Data: []byte(challenge)})
	if err := be.Flush(); err != nil {
		return err
	}
	if err := be.SetAuthType(pgproto3.AuthTypeSASLContinue); err != nil {
		return err
	}
	msg, err = be.Receive()
	if err != nil {
		return err
	}
	resp, ok := msg.(*pgproto3.SASLResponse)
	if !ok {
		return errLogin{"expected a SASL response"}
	}
	final, err := conv.Step(string(resp.Data))
	if err != nil || !conv.Valid() || !known {
		return errLogin{"password authentication failed for user " + user}
	}
	be.Send(&pgproto3.AuthenticationSASLFinal{Data: []byte(final)})
	return nil
}
