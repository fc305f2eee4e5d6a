# floodgauge - top-level Makefile.
#
#   make            build build/floodgauge (installs missing Debian packages first when root)
#   make run        build and run the demo on the bundled invented plant
#   make test       build and run every test; ends with "N passed, N failed"
#   make test SAN=1 the same under AddressSanitizer + UndefinedBehaviorSanitizer (build/san/)
#   make bench      performance figures (printed, never asserted)
#   make install    PREFIX=/usr/local DESTDIR=
#   make deb        the Debian package (dpkg-buildpackage), in build/deb/
#   make fuzz       each libFuzzer target for FUZZ_SECONDS (default 60) s
#
# Knobs: CC, SAN=0|1, WERROR=1|0 (0 for packagers on newer compilers), PREFIX, DESTDIR.

CC      ?= cc
SAN     ?= 0
WERROR  ?= 1
PREFIX  ?= /usr/local
DESTDIR ?=

ifeq ($(SAN),1)
BUILD   := build/san
OPT     := -O1 -g -fno-omit-frame-pointer -fsanitize=address,undefined -fno-sanitize-recover=all
else
BUILD   := build
# -O3 and no errno from the math functions (nothing reads it): the same
# results bit for bit, fewer instructions on the per-row path.
OPT     := -O3 -g -fno-math-errno
endif

# Link-time optimisation of the program itself with gcc: the per-row path
# crosses files (engine -> validate -> units, models -> section). The
# objects keep their machine code as well (fat), so the tests and tools link
# the archive without it, and the sanitizer and clang builds go without.
CC_IS_CLANG := $(shell $(CC) -dM -E -x c /dev/null 2>/dev/null | grep -c __clang__)
ifneq ($(SAN),1)
ifeq ($(CC_IS_CLANG),0)
LTO := -flto=auto -ffat-lto-objects
endif
endif

WARN := -Wall -Wextra -Wconversion -Wshadow -Wstrict-prototypes -Wmissing-prototypes -Wformat=2 \
        -Wno-sign-conversion
ifeq ($(WERROR),1)
WARN += -Werror
endif

# Recursively expanded on purpose: pkg-config may only exist after `make deps`.
PKG_CFLAGS = $(shell pkg-config --cflags libmodbus inih libcjson libsystemd 2>/dev/null)
PKG_LIBS   = $(shell pkg-config --libs libmodbus inih libcjson libsystemd 2>/dev/null) -lpaho-mqtt3as

CPPFLAGS := -D_POSIX_C_SOURCE=200809L -D_DEFAULT_SOURCE -Imodels -Imonitor -Idrivers -Ireplay
CFLAGS   := -std=c11 $(OPT) $(WARN) -MMD -MP $(EXTRA_CFLAGS)
LDLIBS    = $(PKG_LIBS) -lm -lpthread

LIB_SRC  := $(wildcard models/*.c drivers/*.c replay/*.c) $(filter-out monitor/main.c,$(wildcard monitor/*.c))
LIB_OBJ  := $(LIB_SRC:%.c=$(BUILD)/obj/%.o)
MAIN_OBJ := $(BUILD)/obj/monitor/main.o
BIN      := $(BUILD)/floodgauge

TSUP_SRC := $(wildcard tests/support/*.c)
TSUP_OBJ := $(TSUP_SRC:%.c=$(BUILD)/obj/%.o)
TEST_SRC := $(wildcard tests/unit/test_*.c tests/ref/test_*.c)
TEST_BIN := $(TEST_SRC:tests/%.c=$(BUILD)/tests/%)

# Models as a shared library, without sanitizers, for the python3-fluids
# comparison scripts (ctypes).
REF_OBJ  := $(wildcard models/*.c)
REF_SO   := build/ref/libfgmodels.so

.PHONY: all bin deps run test tests-bin bench install install-files deb fuzz clean
.DEFAULT_GOAL := all

all: deps
	@$(MAKE) --no-print-directory bin

# tools/deps.sh installs per use: build, run (the demo), test, fuzz, deb.
deps:
	@sh tools/deps.sh build

bin: $(BIN)

$(BIN): $(MAIN_OBJ) $(BUILD)/libfg.a
	$(CC) $(CFLAGS) $(LTO) $(EXTRA_LDFLAGS) -o $@ $(MAIN_OBJ) \
		$(if $(LTO),$(LIB_OBJ),$(BUILD)/libfg.a) $(LDLIBS)

$(BUILD)/libfg.a: $(LIB_OBJ)
	@mkdir -p $(@D)
	rm -f $@ && ar rcs $@ $^

$(BUILD)/obj/%.o: %.c
	@mkdir -p $(@D)
	$(CC) $(CPPFLAGS) $(PKG_CFLAGS) $(CFLAGS) $(LTO) -c -o $@ $<

# Per-test extra link flags (wrapping) go here as target-specific variables.
TEST_LDFLAGS =
$(BUILD)/tests/unit/test_engine: TEST_LDFLAGS = -Wl,--wrap=malloc,--wrap=calloc,--wrap=realloc
$(BUILD)/tests/%: tests/%.c $(TSUP_OBJ) $(BUILD)/libfg.a
	@mkdir -p $(@D)
	$(CC) $(CPPFLAGS) $(PKG_CFLAGS) -Itests/support $(CFLAGS) -o $@ $< $(TSUP_OBJ) \
		$(BUILD)/libfg.a $(TEST_LDFLAGS) -lcmocka $(LDLIBS)

$(REF_SO): $(REF_OBJ) $(wildcard models/*.h)
	@mkdir -p $(@D)
	$(CC) -std=c11 -O2 -fPIC -shared -D_POSIX_C_SOURCE=200809L -Imodels -o $@ $(REF_OBJ) -lm

# The bench's programs are built with the tests, so that a change to the
# engine's interface cannot leave them behind unnoticed.
BENCH_TOOLS := $(BUILD)/tools/benchgen $(BUILD)/tools/benchtool
tests-bin: $(BIN) $(TEST_BIN) $(REF_SO) $(BENCH_TOOLS)

test:
	@sh tools/deps.sh test
	@$(MAKE) --no-print-directory tests-bin
	@FG_BUILD=$(BUILD) FG_BIN=$(BIN) FG_REF_SO=$(REF_SO) SAN=$(SAN) sh tests/run.sh

run:
	@sh tools/deps.sh run
	@$(MAKE) --no-print-directory bin
	@FG_BIN=$(BIN) sh tools/demo.sh

# The bench's own programs: the data generator and the stage timer.
$(BUILD)/tools/benchgen: tools/benchgen.c
	@mkdir -p $(@D)
	$(CC) $(CPPFLAGS) $(CFLAGS) -o $@ $< -lm
$(BUILD)/tools/benchtool: tools/benchtool.c $(BUILD)/libfg.a
	@mkdir -p $(@D)
	$(CC) $(CPPFLAGS) $(PKG_CFLAGS) $(CFLAGS) $(LTO) -o $@ $< \
		$(if $(LTO),$(LIB_OBJ),$(BUILD)/libfg.a) $(LDLIBS)

bench: deps
	@$(MAKE) --no-print-directory bin $(BENCH_TOOLS)
	@FG_BIN=$(BIN) FG_TOOLS=$(BUILD)/tools sh tools/bench.sh

install: all
	@$(MAKE) --no-print-directory install-files

# What `install` copies, without building or installing packages first (the
# Debian package's rules call this). CONF_DIR and SYSTEMD_UNIT_DIR, when set,
# also install the site template as CONF_DIR/floodgauge.ini and the unit.
install-files:
	install -d $(DESTDIR)$(PREFIX)/bin $(DESTDIR)$(PREFIX)/share/man/man1 \
		$(DESTDIR)$(PREFIX)/share/floodgauge
	install -m 0755 $(BIN) $(DESTDIR)$(PREFIX)/bin/floodgauge
	install -m 0644 docs/floodgauge.1 $(DESTDIR)$(PREFIX)/share/man/man1/floodgauge.1
	install -m 0644 configs/demo.ini $(DESTDIR)$(PREFIX)/share/floodgauge/demo.ini
	install -m 0644 configs/site-template.ini $(DESTDIR)$(PREFIX)/share/floodgauge/site-template.ini
	sed 's|/usr/local|$(PREFIX)|g' configs/floodgauge.service \
		>$(DESTDIR)$(PREFIX)/share/floodgauge/floodgauge.service
	if [ -n "$(CONF_DIR)" ]; then install -D -m 0644 configs/site-template.ini \
		$(DESTDIR)$(CONF_DIR)/floodgauge.ini; fi
	if [ -n "$(SYSTEMD_UNIT_DIR)" ]; then install -d $(DESTDIR)$(SYSTEMD_UNIT_DIR) && \
		sed 's|/usr/local|$(PREFIX)|g' configs/floodgauge.service \
		>$(DESTDIR)$(SYSTEMD_UNIT_DIR)/floodgauge.service; fi

# The Debian package, built by dpkg-buildpackage (debhelper) from a copy of
# the tree in build/deb/src; the .deb lands in build/deb/, checked by lintian.
deb:
	@sh tools/deps.sh deb
	rm -rf build/deb && mkdir -p build/deb/src
	tar --exclude=./build --exclude=./.git -cf - . | tar -xf - -C build/deb/src
	cd build/deb/src && dpkg-buildpackage -us -uc -b
	lintian --info build/deb/floodgauge_*.deb || true
	@ls build/deb/*.deb

# libFuzzer targets (tests/fuzz/fuzz_NAME.c, seeds in tests/fuzz/corpus/NAME):
# clang with ASan and UBSan; the library is built for them in build/fuzz.
# Each runs FUZZ_SECONDS; new inputs go to build/fuzz/corpus/NAME (the
# committed seeds are only read), a crash leaves build/fuzz/crash-* and fails.
FUZZ_TARGETS := csvread config command regcodec alarmstate
FUZZ_SECONDS ?= 60
FUZZ_SAN := -fsanitize=address,undefined -fno-sanitize-recover=all
FUZZ_BIN := $(FUZZ_TARGETS:%=build/fuzz/fuzz_%)

fuzz:
	@sh tools/deps.sh fuzz
	@$(MAKE) --no-print-directory CC=clang BUILD=build/fuzz \
		EXTRA_CFLAGS="-O1 -fno-omit-frame-pointer -fsanitize=fuzzer-no-link $(FUZZ_SAN)" \
		build/fuzz/libfg.a
	@$(MAKE) --no-print-directory CC=clang BUILD=build/fuzz $(FUZZ_BIN)
	@for t in $(FUZZ_TARGETS); do \
		mkdir -p build/fuzz/corpus/$$t; \
		echo "fuzz: $$t for $(FUZZ_SECONDS) s"; \
		build/fuzz/fuzz_$$t -max_total_time=$(FUZZ_SECONDS) -timeout=10 -rss_limit_mb=1024 \
			-artifact_prefix=build/fuzz/ -print_final_stats=1 \
			build/fuzz/corpus/$$t tests/fuzz/corpus/$$t 2>build/fuzz/$$t.log \
			|| { tail -40 build/fuzz/$$t.log; exit 1; }; \
		grep -E '^stat::number_of_executed_units|^stat::new_units_added' build/fuzz/$$t.log \
			| sed "s/^/fuzz: $$t /"; \
	done

build/fuzz/fuzz_%: tests/fuzz/fuzz_%.c build/fuzz/libfg.a
	clang $(CPPFLAGS) -D_GNU_SOURCE $(PKG_CFLAGS) -std=c11 -g -O1 -fsanitize=fuzzer $(FUZZ_SAN) \
		-o $@ $< build/fuzz/libfg.a $(LDLIBS)

clean:
	rm -rf build

-include $(LIB_OBJ:.o=.d) $(MAIN_OBJ:.o=.d) $(TSUP_OBJ:.o=.d) $(TEST_BIN:=.d) $(BENCH_TOOLS:=.d)
