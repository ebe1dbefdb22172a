# hone - build settings first.
#   make            the program ./hone and the library build/libhone.a
#   make check      every test; ends with "N passed, N failed"
#   make demo       the demo sessions on demo-data/
#   make bench      speed figures against the one-pass floor and the scripted baseline
#                   (BENCH_QUICK=1: n = 10^4 and 10^5 only, fewer runs)
#   make asan       everything under AddressSanitizer + UBSan (leaks too), then the tests
#   make valgrind   the demo command files under valgrind memcheck
#   make fuzz SECONDS=N   libFuzzer targets (clang), N seconds each on their seed corpora
#   make deps       install the Debian packages the build needs (root)
#   make install PREFIX=/usr/local
PREFIX    ?= /usr/local
CC        ?= gcc
BUILD     ?= build
OPT       ?= -O2 -g
PKGS      := gsl lapacke fftw3 readline libcrypto cairo
WARN      := -Wall -Wextra -Werror -Wshadow -Wpointer-arith -Wstrict-prototypes \
             -Wmissing-prototypes -Wformat=2 -Wvla -Wundef
CFLAGS    ?= $(OPT)
ALL_CFLAGS = -std=c11 -D_DEFAULT_SOURCE -ffp-contract=off $(WARN) $(CFLAGS) $(SAN) -fopenmp -Ifit -Idiagnose -Ishell \
             $(shell pkg-config --cflags $(PKGS))
# cairo's headers only: shell/sh_cairo.c loads the library when a drawing
# first needs it, so that a start does not pay for its 19 libraries.
LDLIBS    := $(shell pkg-config --libs $(filter-out cairo,$(PKGS))) -lcsv -lm
# The program links GCC's OpenMP runtime statically, so that the default it
# sets for idle threads (shell/sh_main.c) is in place before the runtime
# reads its environment; other compilers link their own runtime as usual.
GOMP_A    := $(if $(findstring clang,$(CC)),,$(shell $(CC) -print-file-name=libgomp.a))
PROG_OMP  := $(if $(filter /%,$(GOMP_A)),$(GOMP_A) -lpthread -ldl,-fopenmp)
PROG_CFLAGS = $(filter-out -fopenmp,$(ALL_CFLAGS))
# The program takes the other libraries from their static archives where
# every one is installed: a start then maps no library but libc's and
# resolves no symbol at run time (hone -c quit: about 2 ms instead of 7 on
# the bench machine).  The order keeps GSL on its own CBLAS, as the shared
# libraries do, so that the digits are the same either way.  Without every
# archive it links the shared libraries as the tests do.
STATIC_LIBS := gsl gslcblas lapacke lapack blas fftw3 readline tinfo crypto csv gfortran quadmath
STATIC_A  := $(foreach l,$(STATIC_LIBS),$(shell $(CC) -print-file-name=lib$(l).a))
PROG_LIBS := $(if $(findstring clang,$(CC))$(filter-out /%,$(STATIC_A)),$(LDLIBS),\
               -Wl,-Bstatic $(addprefix -l,$(STATIC_LIBS)) -Wl,-Bdynamic -lm -ldl)
# the drawing tests read pixels through cairo itself
TEST_LIBS := $(shell pkg-config --libs cmocka cairo)
VERSION   := $(shell cat VERSION 2>/dev/null || echo 0.0.0)

LIB_SRC   := $(sort $(wildcard fit/*.c diagnose/*.c))
SH_SRC    := $(sort $(filter-out shell/sh_main.c,$(wildcard shell/*.c)))
TEST_SRC  := $(sort $(wildcard tests/unit/test_*.c))
LIB_OBJ   := $(LIB_SRC:%.c=$(BUILD)/%.o)
SH_OBJ    := $(SH_SRC:%.c=$(BUILD)/%.o)
TEST_BIN  := $(TEST_SRC:tests/unit/%.c=$(BUILD)/tests/%)

.PHONY: all check demo asan deps install clean bench valgrind fuzz fuzz-run fuzz-build hone-asan-check
all: hone

$(BUILD)/%.o: %.c $(wildcard fit/*.h fit/*.inc diagnose/*.h shell/*.h) Makefile
	@mkdir -p $(dir $@)
	@echo "  CC   $<"
	@$(CC) $(ALL_CFLAGS) -DHONE_VERSION='"$(VERSION)"' -c -o $@ $<

$(BUILD)/libhone.a: $(LIB_OBJ)
	@rm -f $@
	@ar rcs $@ $^

$(BUILD)/libhoneshell.a: $(SH_OBJ)
	@rm -f $@
	@ar rcs $@ $^

hone: $(BUILD)/shell/sh_main.o $(BUILD)/libhoneshell.a $(BUILD)/libhone.a
	@echo "  LINK $@"
	@$(CC) $(PROG_CFLAGS) -o $@ $^ $(PROG_OMP) $(PROG_LIBS)

$(BUILD)/tests/%: tests/unit/%.c tests/unit/testutil.h tests/unit/tu_dft.h $(BUILD)/libhoneshell.a $(BUILD)/libhone.a
	@mkdir -p $(dir $@)
	@echo "  LINK $@"
	@$(CC) $(ALL_CFLAGS) -Itests/unit -o $@ $< $(BUILD)/libhoneshell.a $(BUILD)/libhone.a $(TEST_LIBS) $(LDLIBS)

check: hone $(TEST_BIN)
	@HONE=$(CURDIR)/hone BUILD=$(BUILD) sh tests/run.sh

BENCH_BIN := $(BUILD)/bench/hbench $(BUILD)/bench/empty

$(BUILD)/bench/hbench: tests/bench/hbench.c $(BUILD)/libhoneshell.a $(BUILD)/libhone.a Makefile
	@mkdir -p $(dir $@)
	@echo "  LINK $@"
	@$(CC) $(ALL_CFLAGS) -o $@ $< $(BUILD)/libhoneshell.a $(BUILD)/libhone.a $(LDLIBS)

$(BUILD)/bench/empty: tests/bench/empty.c Makefile
	@mkdir -p $(dir $@)
	@echo "  LINK $@"
	@$(CC) $(PROG_CFLAGS) -o $@ $< -Wl,--no-as-needed $(PROG_OMP) $(PROG_LIBS)

bench: hone $(BENCH_BIN)
	@HONE=$(CURDIR)/hone BENCH_DIR=$(CURDIR)/$(BUILD)/bench sh tests/bench/run.sh

demo: hone
	./hone demo-data/bakery.hone
	./hone demo-data/grain.hone

asan:
	$(MAKE) BUILD=build-asan OPT='-O1 -g -fno-omit-frame-pointer' \
	  SAN='-fsanitize=address,undefined -fno-sanitize-recover=undefined' \
	  HONE_BIN=hone-asan hone-asan-check

# The sanitizer options: leaks are errors (LeakSanitizer is part of ASan on
# x86-64 Linux), any undefined behaviour aborts with a stack.
SAN_ENV := ASAN_OPTIONS=detect_leaks=1:abort_on_error=0:detect_stack_use_after_return=1 \
           UBSAN_OPTIONS=halt_on_error=1:print_stacktrace=1 \
           LSAN_OPTIONS=suppressions=$(CURDIR)/tests/lsan.supp:print_suppressions=0

hone-asan-check: $(BUILD)/shell/sh_main.o $(BUILD)/libhoneshell.a $(BUILD)/libhone.a $(TEST_BIN)
	$(CC) $(PROG_CFLAGS) -o $(BUILD)/hone $(BUILD)/shell/sh_main.o $(BUILD)/libhoneshell.a $(BUILD)/libhone.a $(PROG_OMP) $(LDLIBS)
	@$(SAN_ENV) HONE=$(CURDIR)/$(BUILD)/hone BUILD=$(BUILD) sh tests/run.sh

# Memcheck on the demo sessions and tests/memcheck.hone: any error or definitely
# lost block fails.
# tests/valgrind.supp names the few one-time allocations of other libraries.
VALGRIND := valgrind --quiet --error-exitcode=99 --leak-check=full \
            --errors-for-leak-kinds=definite --show-leak-kinds=definite \
            --suppressions=tests/valgrind.supp --num-callers=30
VALGRIND_FILES := demo-data/bakery.hone demo-data/grain.hone tests/memcheck.hone

valgrind: hone
	@for f in $(VALGRIND_FILES); do \
	  echo "  MEMCHECK $$f"; \
	  OMP_NUM_THREADS=2 $(VALGRIND) ./hone $$f >/dev/null || { echo "valgrind: $$f failed"; exit 1; }; \
	done; echo "valgrind: no errors, no definite leaks"

# libFuzzer targets: tests/fuzz/fuzz_*.c against the library and the shell
# built with clang in build-fuzz/.  Inputs found are kept in
# build-fuzz/corpus/TARGET (the seeds in tests/fuzz/corpus/TARGET are only
# read); crashes are written as build-fuzz/TARGET-crash-*.
SECONDS   ?= 60
FUZZ_SRC  := $(sort $(wildcard tests/fuzz/fuzz_*.c))
FUZZ_BIN  := $(FUZZ_SRC:tests/fuzz/%.c=build-fuzz/%)

fuzz:
	$(MAKE) BUILD=build-fuzz CC=clang OPT='-O1 -g -fno-omit-frame-pointer' \
	  WARN='-Wall -Wextra -Wno-unused-parameter -Wno-unused-command-line-argument' \
	  SAN='-fsanitize=fuzzer-no-link,address,undefined -fno-sanitize-recover=undefined' \
	  fuzz-run

fuzz-build: $(FUZZ_BIN)

build-fuzz/fuzz_%: tests/fuzz/fuzz_%.c $(BUILD)/libhoneshell.a $(BUILD)/libhone.a
	@echo "  LINK $@"
	@$(CC) $(ALL_CFLAGS) -fsanitize=fuzzer -o $@ $< $(BUILD)/libhoneshell.a $(BUILD)/libhone.a $(LDLIBS)

fuzz-run: $(FUZZ_BIN)
	@for b in $(FUZZ_BIN); do \
	  t=$${b#build-fuzz/fuzz_}; mkdir -p build-fuzz/corpus/$$t; \
	  echo "  FUZZ $$t for $(SECONDS) s"; \
	  ASAN_OPTIONS=detect_leaks=1 UBSAN_OPTIONS=halt_on_error=1:print_stacktrace=1 \
	  $$b -max_total_time=$(SECONDS) -timeout=20 -rss_limit_mb=2048 -print_final_stats=1 \
	    -artifact_prefix=build-fuzz/$$t- build-fuzz/corpus/$$t tests/fuzz/corpus/$$t \
	    >build-fuzz/$$t.log 2>&1 || { tail -n 60 build-fuzz/$$t.log; exit 1; }; \
	  grep -E '^#[0-9]+[[:space:]]+DONE' build-fuzz/$$t.log | tail -n 1; grep '^Done ' build-fuzz/$$t.log; \
	done

deps:
	sh tools/install-deps.sh

install: hone
	install -d $(DESTDIR)$(PREFIX)/bin $(DESTDIR)$(PREFIX)/share/man/man1
	install -m 755 hone $(DESTDIR)$(PREFIX)/bin/hone
	if [ -f docs/hone.1 ]; then install -m 644 docs/hone.1 $(DESTDIR)$(PREFIX)/share/man/man1/hone.1; fi

clean:
	rm -rf build build-asan build-fuzz hone
