package explorer

import (
	"database/sql"
	"fmt"
	"io"
	"time"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	"github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
)

// parquetBatch is how many rows go into one record batch (and row group).
const parquetBatch = 65536

// writeParquet streams rows (typed as downloadSQL casts them) to w as a
// Parquet file, with arrow-go's writer: DuckDB, sandboxed, may not write a
// file anywhere the page could send.
func writeParquet(w io.Writer, rows *sql.Rows, cols []column) error {
	fields := make([]arrow.Field, len(cols))
	for i, c := range cols {
		fields[i] = arrow.Field{Name: c.Name, Type: arrowType(c.Type), Nullable: true}
	}
	schema := arrow.NewSchema(fields, nil)
	props := parquet.NewWriterProperties(parquet.WithCompression(compress.Codecs.Snappy))
	fw, err := pqarrow.NewFileWriter(schema, w, props, pqarrow.DefaultWriterProps())
	if err != nil {
		return err
	}
	b := array.NewRecordBuilder(memory.DefaultAllocator, schema)
	defer b.Release()
	vals := make([]any, len(cols))
	ptrs := make([]any, len(cols))
	for i := range vals {
		ptrs[i] = &vals[i]
	}
	flush := func() error {
		rec := b.NewRecordBatch()
		defer rec.Release()
		return fw.Write(rec)
	}
	n := 0
	for rows.Next() {
		if err := rows.Scan(ptrs...); err != nil {
			fw.Close()
			return err
		}
		for i, v := range vals {
			if err := appendValue(b.Field(i), v); err != nil {
				fw.Close()
				return fmt.Errorf("column %s: %w", cols[i].Name, err)
			}
		}
		if n++; n%parquetBatch == 0 {
			if err := flush(); err != nil {
				fw.Close()
				return err
			}
		}
	}
	if err := rows.Err(); err != nil {
		fw.Close()
		return err
	}
	if n%parquetBatch != 0 || n == 0 {
		if err := flush(); err != nil {
			fw.Close()
			return err
		}
	}
	return fw.Close()
}

func arrowType(t string) arrow.DataType {
	switch t {
	case "BOOLEAN":
		return arrow.FixedWidthTypes.Boolean
	case "BIGINT":
		return arrow.PrimitiveTypes.Int64
	case "DOUBLE":
		return arrow.PrimitiveTypes.Float64
	case "DATE":
		return arrow.FixedWidthTypes.Date32
	case "TIMESTAMP":
		return &arrow.TimestampType{Unit: arrow.Microsecond}
	case "VARCHAR[]":
		return arrow.ListOf(arrow.BinaryTypes.String)
	}
	return arrow.BinaryTypes.String
}

func appendValue(b array.Builder, v any) error {
	if v == nil {
		b.AppendNull()
		return nil
	}
	switch fb := b.(type) {
	case *array.BooleanBuilder:
		x, ok := v.(bool)
		if !ok {
			return fmt.Errorf("want a boolean, got %T", v)
		}
		fb.Append(x)
	case *array.Int64Builder:
		x, ok := v.(int64)
		if !ok {
			return fmt.Errorf("want an integer, got %T", v)
		}
		fb.Append(x)
	case *array.Float64Builder:
		x, ok := v.(float64)
		if !ok {
			return fmt.Errorf("want a number, got %T", v)
		}
		fb.Append(x)
	case *array.Date32Builder:
		x, ok := v.(time.Time)
		if !ok {
			return fmt.Errorf("want a date, got %T", v)
		}
		fb.Append(arrow.Date32FromTime(x))
	case *array.TimestampBuilder:
		x, ok := v.(time.Time)
		if !ok {
			return fmt.Errorf("want a time, got %T", v)
		}
		fb.Append(arrow.Timestamp(x.UnixMicro()))
	case *array.ListBuilder:
		x, ok := v.([]any)
		if !ok {
			return fmt.Errorf("want a list, got %T", v)
		}
		fb.Append(true)
		sb := fb.ValueBuilder().(*array.StringBuilder)
		for _, e := range x {
			if s, ok := e.(string); ok {
				sb.Append(s)
			} else {
				sb.AppendNull()
			}
		}
	case *array.StringBuilder:
		x, ok := v.(string)
		if !ok {
			return fmt.Errorf("want text, got %T", v)
		}
		fb.Append(x)
	default:
		return fmt.Errorf("cannot write %T", b)
	}
	return nil
}
