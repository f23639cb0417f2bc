package net.zbin.io.db;

import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.SQLException;
import java.util.Properties;

/** Connections to the plant's PostgreSQL, with timeouts, so a database that hangs cannot hang the historian. */
public final class Db {
    private Db() {}

    /** A role to connect as; the password (may be null: trust or a client certificate) is never printed. */
    public record Login(String url, String user, char[] password) {
        public Login {
            password = password == null ? null : password.clone();
        }

        @Override
        public String toString() { return "Login[" + user + " at " + url + "]"; }
    }

    public static Connection connect(Login l, String application) throws SQLException {
        Properties p = new Properties();
        p.setProperty("user", l.user());
        if (l.password() != null) p.setProperty("password", new String(l.password()));
        p.setProperty("ApplicationName", application);
        p.setProperty("connectTimeout", "10");
        p.setProperty("socketTimeout", "60");
        p.setProperty("tcpKeepAlive", "true");
        return DriverManager.getConnection(l.url(), p);
    }

    /**
     * True for a failure of the connection or the server (retry later), false for a failure of the data (a row that
     * cannot be stored). SQLSTATE classes 08 connection, 53 insufficient resources (a full disk), 57 operator
     * intervention (a shutdown), 58 system error, and a connection the driver found closed.
     */
    public static boolean transient_(SQLException e) {
        String s = e.getSQLState();
        if (s == null) return true;
        return s.startsWith("08") || s.startsWith("53") || s.startsWith("57") || s.startsWith("58") || s.equals("40001") || s.equals("40P01");
    }
}
