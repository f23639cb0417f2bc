package net.zbin.io.db;

import org.flywaydb.core.Flyway;

/** The historian's schema, brought to the current version by Flyway (migrations in the jar, run as the owner role). */
public final class Schema {
    private Schema() {}

    /** @return the schema version now */
    public static String migrate(Db.Login owner) {
        Flyway f = Flyway.configure(Schema.class.getClassLoader())
                .dataSource(owner.url(), owner.user(), owner.password() == null ? null : new String(owner.password()))
                .locations("classpath:db/historian").table("zbin_schema_history").load();
        f.migrate();
        return f.info().current().getVersion().getVersion();
    }
}
