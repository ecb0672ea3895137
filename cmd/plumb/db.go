package main

import (
	"context"
	"database/sql"
)

// sqlDB is what commands need of a database: a connection of their own.
type sqlDB interface {
	Conn(ctx context.Context) (*sql.Conn, error)
}
