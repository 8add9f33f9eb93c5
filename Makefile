# propbench - build, tests, demo and benchmarks.
# Every target that compiles first runs scripts/install-deps.sh, which installs
# missing Debian packages (and does nothing when all are present).

CC      ?= cc
PREFIX  ?= /usr/local
DESTDIR ?=
PKGS    := gsl jansson inih nettle
WARN    := -Wall -Wextra -Wshadow -Wmissing-prototypes -Wstrict-prototypes -Wdouble-promotion
CSTD    := -std=c11 -D_POSIX_C_SOURCE=200809L -D_DEFAULT_SOURCE
OPT     ?= -O2 -g
PB_CFLAGS  = $(CSTD) $(OPT) $(WARN) -I. -Iinclude -fPIC -fno-semantic-interposition -fvisibility=hidden -DPB_BUILD_FLAGS='"$(CSTD) $(OPT) $(WARN)"' $(shell pkg-config --cflags $(PKGS) 2>/dev/null) $(CFLAGS)
PB_LDLIBS  = $(shell pkg-config --libs $(PKGS) 2>/dev/null) -lquadmath -lm -pthread $(LDLIBS)
TEST_LIBS  = $(shell pkg-config --libs criterion 2>/dev/null)
SAN        := -fsanitize=address,undefined,float-cast-overflow -fno-omit-frame-pointer -fno-sanitize-recover=undefined,float-cast-overflow

# Every .c below problems/, integrators/ and bench/'s layer folders is library
# code, except the two programs' mains.
LIB_SRC  := $(sort $(wildcard problems/*.c integrators/*.c) $(filter-out bench/cli/main.c bench/perf/%,$(wildcard bench/*/*.c)))
TEST_SRC := $(sort $(wildcard tests/test_*.c))

PUBLIC_H := $(wildcard include/propbench/*.h)
VERSION  := $(shell sed -n 's/^\#define PB_VERSION "\(.*\)"/\1/p' include/propbench/propbench.h)
ABI      := $(shell sed -n 's/^\#define PB_METHOD_ABI \([0-9]*\)u/\1/p' include/propbench/method.h)

B  := build
BA := build/asan
LIB_OBJ   := $(LIB_SRC:%.c=$(B)/%.o)
LIB_OBJ_A := $(LIB_SRC:%.c=$(BA)/%.o)
TEST_OBJ   := $(TEST_SRC:%.c=$(B)/%.o)
TEST_OBJ_A := $(TEST_SRC:%.c=$(BA)/%.o)

BIN   := $(B)/propbench
BIN_A := $(BA)/propbench

.PHONY: all deps demo fuzz fuzz-deps test test-layout test-plain test-asan test-install bench clean install uninstall
all: $(BIN) $(B)/plugins/ralston3.so

deps:
	@sh scripts/install-deps.sh

$(B)/%.o: %.c Makefile | deps
	@mkdir -p $(dir $@)
	$(CC) $(PB_CFLAGS) -MMD -MP -c $< -o $@

$(BA)/%.o: %.c Makefile | deps
	@mkdir -p $(dir $@)
	$(CC) $(PB_CFLAGS) $(SAN) -MMD -MP -c $< -o $@

$(B)/libpropbench.a: $(LIB_OBJ)
	@rm -f $@; ar rcs $@ $^
# The same objects (built position-independent) as a shared library, with
# its dependencies recorded so that users link with -lpropbench alone.
$(B)/libpropbench.so: $(LIB_OBJ)
	$(CC) -shared -Wl,-soname,libpropbench.so.$(ABI) -o $@ $^ $(PB_LDLIBS)
$(BA)/libpropbench.a: $(LIB_OBJ_A)
	@rm -f $@; ar rcs $@ $^

# The example plug-in (examples/plugins/): a shared object built against the
# public headers alone, as a user builds one.
$(B)/plugins/%.so: examples/plugins/%.c $(PUBLIC_H) Makefile | deps
	@mkdir -p $(dir $@)
	$(CC) $(CSTD) $(OPT) $(WARN) -Iinclude -shared -fPIC $< -o $@

# -rdynamic: a plug-in calls the public functions (pb_dense_*) of the program
$(BIN): $(B)/bench/cli/main.o $(B)/libpropbench.a
	$(CC) $(PB_CFLAGS) -rdynamic -o $@ $^ $(PB_LDLIBS)
$(BIN_A): $(BA)/bench/cli/main.o $(BA)/libpropbench.a
	$(CC) $(PB_CFLAGS) $(SAN) -rdynamic -o $@ $^ $(PB_LDLIBS)

$(B)/run_tests: $(TEST_OBJ) $(B)/libpropbench.a
	$(CC) $(PB_CFLAGS) -o $@ $^ $(TEST_LIBS) $(PB_LDLIBS)
$(BA)/run_tests: $(TEST_OBJ_A) $(BA)/libpropbench.a
	$(CC) $(PB_CFLAGS) $(SAN) -o $@ $^ $(TEST_LIBS) $(PB_LDLIBS)

# `make bench` is every file in bench/perf/ (one section of the report each).
PERF_OBJ := $(patsubst %.c,$(B)/%.o,$(sort $(wildcard bench/perf/*.c)))
$(B)/bench_main: $(PERF_OBJ) $(B)/libpropbench.a
	$(CC) $(PB_CFLAGS) -o $@ $^ $(PB_LDLIBS)
-include $(PERF_OBJ:.o=.d)

# The suite runs twice: a plain optimised build, then under ASan + UBSan;
# between them, a program built outside the tree against an installed copy.
# Tests find the CLI through PB_BIN and write scratch files below PB_TMP.
test: test-layout test-plain test-install test-asan

# The layering rules of DEVELOPERS.md: include direction, no cycle, file and
# function lengths.
test-layout: | deps
	python3 scripts/check-layout.py --self-test
	python3 scripts/check-layout.py $(CURDIR)

# Both passes share one reference cache (build/test-cache: references built
# by the plain pass serve the sanitizer pass), never the user's own.
# Each run's scratch is its own (test-scratch.<pid>), so two runs in one tree
# never share it; it is removed after a passing run, kept after a failing one.
test-plain: $(B)/run_tests $(BIN) $(B)/plugins/ralston3.so
	PB_WITH_BROWSER=1 sh scripts/install-deps.sh
	d=$(CURDIR)/$(B)/test-scratch.$$$$ && \
	PB_TMP=$$d PB_CACHE_DIR=$(CURDIR)/$(B)/test-cache PB_BIN=$(CURDIR)/$(BIN) PB_ROOT=$(CURDIR) ./$(B)/run_tests --jobs 2 && rm -rf $$d

test-asan: $(BA)/run_tests $(BIN_A) $(B)/plugins/ralston3.so
	d=$(CURDIR)/$(BA)/test-scratch.$$$$ && \
	PB_TMP=$$d PB_CACHE_DIR=$(CURDIR)/$(B)/test-cache LSAN_OPTIONS=suppressions=$(CURDIR)/tests/lsan.supp ASAN_OPTIONS=detect_leaks=1:abort_on_error=0 UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1 \
	PB_SANITIZED=1 PB_BIN=$(CURDIR)/$(BIN_A) PB_ROOT=$(CURDIR) ./$(BA)/run_tests --jobs 2 && rm -rf $$d

demo: $(BIN)
	sh scripts/demo.sh $(BIN)

bench: $(B)/bench_main $(BIN)
	./$(B)/bench_main

# The program, its manual page and bash completion, the public headers
# (include/propbench/), both libraries and propbench.pc, so that `pkg-config --cflags --libs propbench` builds a
# user's method or driver against the installed copy.
LIBDIR ?= $(PREFIX)/lib
install: $(BIN) $(B)/libpropbench.a $(B)/libpropbench.so
	install -d $(DESTDIR)$(PREFIX)/bin $(DESTDIR)$(PREFIX)/share/propbench \
	    $(DESTDIR)$(PREFIX)/include/propbench $(DESTDIR)$(LIBDIR)/pkgconfig
	install -m 755 $(BIN) $(DESTDIR)$(PREFIX)/bin/propbench
	install -m 644 README.md $(DESTDIR)$(PREFIX)/share/propbench/README.md
	install -d $(DESTDIR)$(PREFIX)/share/man/man1 $(DESTDIR)$(PREFIX)/share/bash-completion/completions
	install -m 644 man/propbench.1 $(DESTDIR)$(PREFIX)/share/man/man1/propbench.1
	install -m 644 scripts/propbench-completion.bash $(DESTDIR)$(PREFIX)/share/bash-completion/completions/propbench
	install -m 644 $(PUBLIC_H) $(DESTDIR)$(PREFIX)/include/propbench/
	install -m 644 $(B)/libpropbench.a $(DESTDIR)$(LIBDIR)/libpropbench.a
	install -m 755 $(B)/libpropbench.so $(DESTDIR)$(LIBDIR)/libpropbench.so.$(VERSION)
	ln -sf libpropbench.so.$(VERSION) $(DESTDIR)$(LIBDIR)/libpropbench.so.$(ABI)
	ln -sf libpropbench.so.$(ABI) $(DESTDIR)$(LIBDIR)/libpropbench.so
	sed -e 's|@PREFIX@|$(PREFIX)|' -e 's|@LIBDIR@|$(LIBDIR)|' -e 's|@VERSION@|$(VERSION)|' \
	    -e 's|@REQUIRES@|$(PKGS)|' scripts/propbench.pc.in > $(DESTDIR)$(LIBDIR)/pkgconfig/propbench.pc

uninstall:
	rm -f $(DESTDIR)$(PREFIX)/bin/propbench $(DESTDIR)$(LIBDIR)/libpropbench.*
	rm -f $(DESTDIR)$(LIBDIR)/pkgconfig/propbench.pc
	rm -rf $(DESTDIR)$(PREFIX)/share/propbench $(DESTDIR)$(PREFIX)/include/propbench
	rm -f $(DESTDIR)$(PREFIX)/share/man/man1/propbench.1 $(DESTDIR)$(PREFIX)/share/bash-completion/completions/propbench

# An out-of-tree program (tests/install/) built against a staged install with
# pkg-config alone, then run: the public headers and libraries are enough.
test-install: $(BIN) $(B)/libpropbench.a $(B)/libpropbench.so
	sh tests/install/check-install.sh $(CURDIR) $(CURDIR)/$(B)/install-stage.$$$$

clean:
	rm -rf $(B)

-include $(LIB_OBJ:.o=.d) $(TEST_OBJ:.o=.d) $(LIB_OBJ_A:.o=.d) $(TEST_OBJ_A:.o=.d) $(B)/bench/cli/main.d $(B)/bench/perf/bench_main.d

# Fuzz the readers of outside input with libFuzzer under ASan + UBSan
# (clang's -fsanitize=undefined includes float-cast-overflow): one target per
# reader (tests/fuzz/fuzz_*.c), each run FUZZ_SECONDS from its seed corpus
# committed in tests/fuzz/corpus/<target>/ (copied to build/fuzz/corpus/, where
# libFuzzer adds what it finds). A crash, a leak, a sanitizer report or an input
# taking over 10 s stops it with a non-zero status and the input in
# build/fuzz/<target>-crash-*. Not part of make test (it needs clang); .ci/run
# runs it with FUZZ_SECONDS=20.
FUZZ_SECONDS ?= 60
FUZZ_TARGETS := problem_file oem summary baseline series
FUZZ_SAN  := -fsanitize=address,undefined -fno-sanitize-recover=undefined -fno-omit-frame-pointer
FUZZ_CC    = clang $(CSTD) -g -O1 -I. -Iinclude -I$(B)/fuzz/inc $(shell pkg-config --cflags $(PKGS))
# the library below the command line (the readers live in store/, report/,
# gate/ and problems/)
FUZZ_OBJ  := $(patsubst %.c,$(B)/fuzz/obj/%.o,$(filter-out bench/cli/%,$(LIB_SRC)))

fuzz-deps: | deps
	PB_WITH_FUZZ=1 sh scripts/install-deps.sh
	@mkdir -p $(B)/fuzz/inc
	@# clang reads GCC's quadmath.h (only that header, not GCC's others)
	ln -sf $$(gcc -print-file-name=include)/quadmath.h $$(gcc -print-file-name=include)/quadmath_weak.h $(B)/fuzz/inc/

$(B)/fuzz/obj/%.o: %.c Makefile | fuzz-deps
	@mkdir -p $(dir $@)
	$(FUZZ_CC) $(FUZZ_SAN) -fsanitize=fuzzer-no-link -MMD -MP -c $< -o $@
$(B)/fuzz/libpropbench.a: $(FUZZ_OBJ)
	@rm -f $@; ar rcs $@ $^
$(B)/fuzz/fuzz_%: tests/fuzz/fuzz_%.c tests/fuzz/fuzz_common.h $(B)/fuzz/libpropbench.a | fuzz-deps
	$(FUZZ_CC) $(FUZZ_SAN) -fsanitize=fuzzer $< $(B)/fuzz/libpropbench.a -o $@ $(PB_LDLIBS)
-include $(FUZZ_OBJ:.o=.d)

fuzz: $(FUZZ_TARGETS:%=$(B)/fuzz/fuzz_%)
	@set -e; for t in $(FUZZ_TARGETS); do \
	    mkdir -p $(B)/fuzz/corpus/$$t; cp tests/fuzz/corpus/$$t/* $(B)/fuzz/corpus/$$t/; \
	    echo "fuzz: $$t for $(FUZZ_SECONDS) s"; \
	    ./$(B)/fuzz/fuzz_$$t -max_total_time=$(FUZZ_SECONDS) -max_len=8192 -timeout=10 \
	        -print_final_stats=1 -artifact_prefix=$(B)/fuzz/$$t- $(B)/fuzz/corpus/$$t 2>$(B)/fuzz/$$t.log \
	        || { tail -n 60 $(B)/fuzz/$$t.log; echo "fuzz: $$t found a defect (log: $(B)/fuzz/$$t.log)"; exit 1; }; \
	    grep -h "^stat::number_of_executed_units\|^Done" $(B)/fuzz/$$t.log; \
	done
