// pgjdbc 42.5 (Debian's libpostgresql-jdbc-java) on OpenJDK against plumb
// serve: DatabaseMetaData as SQL tools call it, a PreparedStatement with an
// untyped parameter, setArray, a fetch size with autocommit off, and UUIDs.
// Run as a single-file program: java -cp postgresql.jar JdbcClient.java
import java.sql.*;
import java.util.*;
import java.util.concurrent.Callable;

public class JdbcClient {
    static List<String[]> rows = new ArrayList<>();

    static void check(String operation, Callable<Object> fn) {
        try {
            Object r = fn.call();
            rows.add(new String[]{operation, "ok", r == null ? "" : r.toString()});
        } catch (Throwable e) {
            String msg = String.valueOf(e.getMessage()).split("\n")[0];
            if (System.getenv("PLUMB_TRACE") != null) e.printStackTrace();
            rows.add(new String[]{operation, "FAIL", e.getClass().getSimpleName() + ": " + msg});
        }
    }

    static Object expect(Object got, Object want) {
        if (!Objects.equals(got, want)) throw new AssertionError("got " + got + ", want " + want);
        return got;
    }

    public static void main(String[] args) throws Exception {
        String url = "jdbc:postgresql://" + System.getenv("PLUMB_HOST") + ":" + System.getenv("PLUMB_PORT") + "/plumb";
        Connection c = DriverManager.getConnection(url, System.getenv("PLUMB_USER"), System.getenv("PLUMB_PASSWORD"));
        try (Statement s = c.createStatement()) {
            s.execute("CREATE TABLE jdbc_t (id INTEGER PRIMARY KEY, name VARCHAR NOT NULL, x DOUBLE, d DATE, ts TIMESTAMP, u UUID, l DOUBLE[])");
            s.execute("CREATE VIEW jdbc_v AS SELECT id, name FROM jdbc_t");
            s.execute("CREATE INDEX jdbc_t_name ON jdbc_t (name)");
        }
        DatabaseMetaData md = c.getMetaData();
        check("getTables", () -> {
            List<String> got = new ArrayList<>();
            try (ResultSet rs = md.getTables(null, null, "jdbc_%", new String[]{"TABLE", "VIEW"})) {
                while (rs.next()) got.add(rs.getString("TABLE_NAME") + ":" + rs.getString("TABLE_TYPE"));
            }
            return expect(got, List.of("jdbc_t:TABLE", "jdbc_v:VIEW"));
        });
        check("getColumns (JDBC types)", () -> {
            List<String> got = new ArrayList<>();
            try (ResultSet rs = md.getColumns(null, null, "jdbc_t", null)) {
                while (rs.next()) got.add(rs.getString("COLUMN_NAME") + ":" + rs.getInt("DATA_TYPE") + ":" + rs.getString("TYPE_NAME") + ":" + rs.getInt("NULLABLE"));
            }
            return expect(String.join(" ", got), "id:4:int4:0 name:12:text:0 x:8:float8:1 d:91:date:1 ts:93:timestamp:1 u:1111:uuid:1 l:2003:_float8:1");
        });
        check("getSchemas", () -> {
            List<String> got = new ArrayList<>();
            try (ResultSet rs = md.getSchemas()) {
                while (rs.next()) got.add(rs.getString("TABLE_SCHEM"));
            }
            if (!got.contains("main")) throw new AssertionError("no main in " + got);
            return got;
        });
        check("getPrimaryKeys", () -> {
            List<String> got = new ArrayList<>();
            try (ResultSet rs = md.getPrimaryKeys(null, null, "jdbc_t")) {
                while (rs.next()) got.add(rs.getString("COLUMN_NAME") + ":" + rs.getInt("KEY_SEQ"));
            }
            return expect(got, List.of("id:1"));
        });
        check("getIndexInfo", () -> {
            List<String> got = new ArrayList<>();
            try (ResultSet rs = md.getIndexInfo(null, null, "jdbc_t", false, false)) {
                while (rs.next()) got.add(rs.getString("INDEX_NAME") + ":" + rs.getString("COLUMN_NAME") + ":" + (rs.getBoolean("NON_UNIQUE") ? "non-unique" : "unique"));
            }
            return expect(got, List.of("jdbc_t_pkey:id:unique", "jdbc_t_name:name:non-unique"));
        });
        check("getFunctions", () -> {
            List<String> got = new ArrayList<>();
            try (ResultSet rs = md.getFunctions(null, null, "unit_root")) {
                while (rs.next()) got.add(rs.getString("FUNCTION_NAME"));
            }
            if (got.isEmpty()) throw new AssertionError("unit_root not listed");
            return got;
        });
        check("getTypeInfo", () -> {
            int n = 0;
            boolean int4 = false;
            try (ResultSet rs = md.getTypeInfo()) {
                while (rs.next()) {
                    n++;
                    if ("int4".equals(rs.getString("TYPE_NAME"))) int4 = rs.getInt("DATA_TYPE") == Types.INTEGER;
                }
            }
            expect(int4, true);
            return n + " types";
        });
        check("PreparedStatement SELECT ? + 1", () -> {
            try (PreparedStatement ps = c.prepareStatement("SELECT ? + 1")) {
                ps.setInt(1, 41);
                try (ResultSet rs = ps.executeQuery()) {
                    rs.next();
                    return expect(rs.getInt(1), 42);
                }
            }
        });
        check("setArray into difference(?)", () -> {
            try (PreparedStatement ps = c.prepareStatement("SELECT difference(?)")) {
                ps.setArray(1, c.createArrayOf("float8", new Double[]{1.0, 4.0, 9.0, 16.0}));
                try (ResultSet rs = ps.executeQuery()) {
                    rs.next();
                    return expect(Arrays.toString((Object[]) rs.getArray(1).getArray()), "[3.0, 5.0, 7.0]");
                }
            }
        });
        check("setFetchSize(100), autocommit off", () -> {
            c.setAutoCommit(false);
            long sum = 0;
            try (Statement s = c.createStatement()) {
                s.setFetchSize(100);
                try (ResultSet rs = s.executeQuery("SELECT i FROM range(1000) t(i) ORDER BY i")) {
                    while (rs.next()) sum += rs.getLong(1);
                }
            }
            c.commit();
            c.setAutoCommit(true);
            return expect(sum, 499500L);
        });
        check("UUID via getObject", () -> {
            try (Statement s = c.createStatement(); ResultSet rs = s.executeQuery("SELECT uuid '6ba7b810-9dad-11d1-80b4-00c04fd430c8'")) {
                rs.next();
                Object u = rs.getObject(1);
                expect(u.getClass().getName(), "java.util.UUID");
                return expect(u.toString(), "6ba7b810-9dad-11d1-80b4-00c04fd430c8");
            }
        });
        check("diagnose with a parameter", () -> {
            try (PreparedStatement ps = c.prepareStatement("SELECT count(*) FROM diagnose(?, by := ['shop', 'product'], at := 'day', value := 'units')")) {
                ps.setString(1, System.getenv("PLUMB_SHOPS"));
                try (ResultSet rs = ps.executeQuery()) {
                    rs.next();
                    return expect(rs.getLong(1), 12L);
                }
            }
        });
        c.close();
        int width = 9;
        for (String[] r : rows) width = Math.max(width, r[0].length());
        System.out.println(String.format("%-" + width + "s | result | detail", "operation"));
        System.out.println("-".repeat(width) + "-+--------+-------");
        int failed = 0;
        for (String[] r : rows) {
            if (!r[1].equals("ok")) failed++;
            String d = r[2].length() > 160 ? r[2].substring(0, 160) : r[2];
            System.out.println(String.format("%-" + width + "s | %-6s | %s", r[0], r[1], d));
        }
        System.out.println("JDBC: " + (rows.size() - failed) + " passed, " + failed + " failed");
        System.exit(failed > 0 ? 1 : 0);
    }
}
