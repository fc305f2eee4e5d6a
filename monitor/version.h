/*
 * version.h - floodgauge's version, printed by `floodgauge --version`.
 * debian/changelog carries the same upstream version (a test compares them).
 */
#ifndef VERSION_H
#define VERSION_H

#define FG_VERSION "1.0.0"

#endif
