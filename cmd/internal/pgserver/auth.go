package pgserver

import (
	"crypto/rand"
	"fmt"

	"github.com/jackc/pgx/v5/pgproto3"
	"github.com/xdg-go/scram"
)

// credentials holds SCRAM-SHA-256 verifiers (RFC 5802, RFC 7677) derived
// once from the configured passwords; the passwords themselves are not kept.
type credentials map[string]scram.StoredCredentials

func newCredentials(users map[string]string) (credentials, error) {
	out := credentials{}
	for user, password := range users {
		salt := make([]byte, 16)
		if _, err := rand.Read(salt); err != nil {
			return nil, err
		}
		client, err := scram.SHA256.NewClient(user, password, "")
		if err != nil {
			return nil, fmt.Errorf("user %s: %w", user, err)
		}
		out[user] = client.GetStoredCredentials(scram.KeyFactors{Salt: string(salt), Iters: 4096})
	}
	return out, nil
}

// errLogin is a failed login: wrong password, unknown user or none given.
type errLogin struct{ reason string }

func (e errLogin) Error() string { return e.reason }

// scramLogin runs the SCRAM-SHA-256 exchange for user over the backend. An
// unknown user goes through the same exchange with a verifier nobody can
// match, so a client cannot tell unknown users from wrong passwords.
func scramLogin(be *pgproto3.Backend, creds credentials, user string) error {
	stored, known := creds[user]
	if !known {
		stored = decoyCredentials
	}
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

var decoyCredentials = func() scram.StoredCredentials {
	salt := make([]byte, 16)
	rand.Read(salt)
	secret := make([]byte, 32)
	rand.Read(secret)
	c, _ := scram.SHA256.NewClient("decoy", fmt.Sprintf("%x", secret), "")
	return c.GetStoredCredentials(scram.KeyFactors{Salt: string(salt), Iters: 4096})
}()
