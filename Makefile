# hone - build settings first.
#   make            the program ./hone and the library build/libhone.a
#   make check      every test; ends with "N passed, N failed"
#   make demo       the demo sessions on demo-data/
#   make asan       everything under AddressSanitizer + UBSan, then the tests
#   make deps       install the Debian packages the build needs (root)
#   make install PREFIX=/usr/local
PREFIX    ?= /usr/local
CC        ?= gcc
BUILD     ?= build
OPT       ?= -O2 -g
PKGS      := gsl lapacke readline libcrypto cairo
WARN      := -Wall -Wextra -Werror -Wshadow -Wpointer-arith -Wstrict-prototypes \
             -Wmissing-prototypes -Wformat=2 -Wvla -Wundef
CFLAGS    ?= $(OPT)
ALL_CFLAGS = -std=c11 -D_DEFAULT_SOURCE $(WARN) $(CFLAGS) $(SAN) -fopenmp -Ifit -Idiagnose -Ishell \
             $(shell pkg-config --cflags $(PKGS))
LDLIBS    := $(shell pkg-config --libs $(PKGS)) -lcsv -lm
TEST_LIBS := $(shell pkg-config --libs cmocka)
VERSION   := $(shell cat VERSION 2>/dev/null || echo 0.0.0)

LIB_SRC   := $(sort $(wildcard fit/*.c diagnose/*.c))
SH_SRC    := $(sort $(filter-out shell/sh_main.c,$(wildcard shell/*.c)))
TEST_SRC  := $(sort $(wildcard tests/unit/test_*.c))
LIB_OBJ   := $(LIB_SRC:%.c=$(BUILD)/%.o)
SH_OBJ    := $(SH_SRC:%.c=$(BUILD)/%.o)
TEST_BIN  := $(TEST_SRC:tests/unit/%.c=$(BUILD)/tests/%)

.PHONY: all check demo asan deps install clean bench valgrind fuzz
all: hone

$(BUILD)/%.o: %.c $(wildcard fit/*.h diagnose/*.h shell/*.h) Makefile
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
	@$(CC) $(ALL_CFLAGS) -o $@ $^ $(LDLIBS)

$(BUILD)/tests/%: tests/unit/%.c tests/unit/testutil.h $(BUILD)/libhoneshell.a $(BUILD)/libhone.a
	@mkdir -p $(dir $@)
	@echo "  LINK $@"
	@$(CC) $(ALL_CFLAGS) -Itests/unit -o $@ $< $(BUILD)/libhoneshell.a $(BUILD)/libhone.a $(TEST_LIBS) $(LDLIBS)

check: hone $(TEST_BIN)
	@HONE=$(CURDIR)/hone BUILD=$(BUILD) sh tests/run.sh

demo: hone
	./hone demo-data/bakery.hone
	./hone demo-data/grain.hone

asan:
	$(MAKE) BUILD=build-asan OPT='-O1 -g -fno-omit-frame-pointer' \
	  SAN='-fsanitize=address,undefined -fno-sanitize-recover=undefined' \
	  HONE_BIN=hone-asan hone-asan-check

hone-asan-check: $(BUILD)/shell/sh_main.o $(BUILD)/libhoneshell.a $(BUILD)/libhone.a $(TEST_BIN)
	$(CC) $(ALL_CFLAGS) -o $(BUILD)/hone $(BUILD)/shell/sh_main.o $(BUILD)/libhoneshell.a $(BUILD)/libhone.a $(LDLIBS)
	@ASAN_OPTIONS=detect_leaks=1 HONE=$(CURDIR)/$(BUILD)/hone BUILD=$(BUILD) sh tests/run.sh

deps:
	sh tools/install-deps.sh

install: hone
	install -d $(DESTDIR)$(PREFIX)/bin $(DESTDIR)$(PREFIX)/share/man/man1
	install -m 755 hone $(DESTDIR)$(PREFIX)/bin/hone
	if [ -f docs/hone.1 ]; then install -m 644 docs/hone.1 $(DESTDIR)$(PREFIX)/share/man/man1/hone.1; fi

clean:
	rm -rf build build-asan hone
