/** MariaDB DATETIME(3) text of a moment, in UTC as the connection stores it. */
export const sqlTime = (d: Date): string => d.toISOString().slice(0, 23).replace('T', ' ')
