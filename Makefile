# irrecon build. Plain GNU make; sources are picked up by wildcard so a new
# stage (src/<stage>.c + include/irrecon/<stage>.h) needs no edit here.
#
#   make            library + program (installs missing Debian packages first)
#   make demo       the main job on the bundled example
#   make test       every test (unit, data-driven, cross-checks, sanitizers)
#   make bench      speed and memory figures
#   make install PREFIX=/usr/local

PREFIX   ?= /usr/local
BUILD    ?= build
CC       ?= cc
CXX      ?= g++
VERSION  := 0.1.0

# Debian packages the build and the tests need; `deps` installs what is missing.
DEB_BUILD := g++ make pkg-config libopenbabel-dev libcjson-dev libcmocka-dev
DEB_TEST  := python3 python3-rdkit python3-scipy libxml2-utils valgrind clang nodejs:node npm:npm chromium python3-pil \
             libclang-rt-dev locales

PKGS      := openbabel-3 libcjson
OPT       ?= -O2
SAN       ?=
CPPFLAGS  += -Iinclude -Isrc \
             -DIRR_VERSION_STRING='"$(VERSION)"' \
             -DIRR_SOURCE_TABLES_DIR='"$(abspath group-tables)"' \
             -DIRR_INSTALL_TABLES_DIR='"$(PREFIX)/share/irrecon/group-tables"'
CFLAGS    ?= $(OPT) -g
CFLAGS    += -std=c11 -D_GNU_SOURCE -Wall -Wextra -Wshadow -Werror=implicit-function-declaration -fPIC $(SAN)
CXXFLAGS  ?= $(OPT) -g
CXXFLAGS  += -std=c++11 -Wall -Wextra -fPIC $(SAN)
PKG_CFLAGS = $(shell pkg-config --cflags $(PKGS) 2>/dev/null)
PKG_LIBS   = $(shell pkg-config --libs $(PKGS) 2>/dev/null)
LDLIBS    += $(PKG_LIBS) -lm -lpthread

LIB_C    := $(sort $(wildcard src/*.c))
LIB_CXX  := $(sort $(wildcard src/*.cpp))
CLI_C    := $(sort $(wildcard src/cli/*.c))
LIB_OBJ  := $(LIB_C:src/%.c=$(BUILD)/obj/%.o) $(LIB_CXX:src/%.cpp=$(BUILD)/obj/%.o)
CLI_OBJ  := $(CLI_C:src/cli/%.c=$(BUILD)/obj/cli/%.o)
UNIT_C   := $(sort $(wildcard tests/unit/test_*.c))
UNIT_BIN := $(UNIT_C:tests/unit/%.c=$(BUILD)/tests/%)

.PHONY: all deps demo test test-unit test-scripts bench install clean fuzz
.DEFAULT_GOAL := all

all: $(BUILD)/.deps-build $(BUILD)/libirrecon.a $(BUILD)/libirrecon.so $(BUILD)/irrecon

# Installs only what is missing; sudo when not root. A stamp keeps it to one check.
$(BUILD)/.deps-build:
	@./tools/ensure-debs $(DEB_BUILD)
	@mkdir -p $(BUILD) && touch $@
$(BUILD)/.deps-test: $(BUILD)/.deps-build
	@./tools/ensure-debs $(DEB_TEST)
	@touch $@
deps: $(BUILD)/.deps-build $(BUILD)/.deps-test

$(BUILD)/obj/%.o: src/%.c | $(BUILD)/.deps-build
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS) $(PKG_CFLAGS) $(CFLAGS) -MMD -MP -c $< -o $@
$(BUILD)/obj/%.o: src/%.cpp | $(BUILD)/.deps-build
	@mkdir -p $(dir $@)
	$(CXX) $(CPPFLAGS) $(PKG_CFLAGS) $(CXXFLAGS) -MMD -MP -c $< -o $@

$(BUILD)/libirrecon.a: $(LIB_OBJ)
	@rm -f $@
	ar rcs $@ $^
$(BUILD)/libirrecon.so: $(LIB_OBJ)
	$(CXX) -shared -Wl,-soname,libirrecon.so.0 $(SAN) -o $@ $^ $(LDLIBS)
# Linked with g++ so libstdc++ (needed by the Open Babel shim) comes in.
$(BUILD)/irrecon: $(CLI_OBJ) $(BUILD)/libirrecon.a
	$(CXX) $(SAN) -o $@ $(CLI_OBJ) $(BUILD)/libirrecon.a $(LDLIBS)

$(BUILD)/tests/%: tests/unit/%.c $(BUILD)/libirrecon.a
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS) $(PKG_CFLAGS) $(CFLAGS) -Itests -c $< -o $@.o
	$(CXX) $(SAN) -o $@ $@.o $(BUILD)/libirrecon.a $(LDLIBS) -lcmocka

# The bundled example: a fictional lab's oxidation checked against its product.
demo: all
	./tools/demo

test: all $(BUILD)/.deps-test $(UNIT_BIN)
	@BUILD=$(BUILD) ./tests/run-all

test-unit: all $(UNIT_BIN)
	@BUILD=$(BUILD) ONLY=unit ./tests/run-all
test-scripts: all $(BUILD)/.deps-test
	@BUILD=$(BUILD) ONLY=scripts ./tests/run-all

# Each libFuzzer target (fuzz/fuzz_*.c) for FUZZ_SECONDS, FUZZ_PARALLEL of
# them at a time; see tools/fuzz.
FUZZ_SECONDS ?= 60
FUZZ_PARALLEL ?= 1
fuzz: $(BUILD)/.deps-test
	./tools/fuzz -t $(FUZZ_SECONDS) -j $(FUZZ_PARALLEL)

# ---- install, pkg-config, bench --------------------------------------------
DESTDIR ?=
BINDIR  ?= $(PREFIX)/bin
LIBDIR  ?= $(PREFIX)/lib
INCDIR  ?= $(PREFIX)/include
DATADIR ?= $(PREFIX)/share/irrecon
MANDIR  ?= $(PREFIX)/share/man

.PHONY: irrecon.pc
irrecon.pc: $(BUILD)/irrecon.pc
# Rebuilt every time: PREFIX may differ between `make` and `make install`.
$(BUILD)/irrecon.pc: irrecon.pc.in FORCE
	@mkdir -p $(BUILD)
	sed -e 's|@PREFIX@|$(PREFIX)|g' -e 's|@VERSION@|$(VERSION)|g' $< > $@
FORCE:

# The man page, made from the program's own --help texts so that it cannot
# drift from the options; docs/irrecon.1 is the committed copy for reading.
$(BUILD)/irrecon.1: $(BUILD)/irrecon tools/mkman
	@if command -v python3 >/dev/null; then python3 tools/mkman $(BUILD)/irrecon > $@.tmp && mv $@.tmp $@; \
	 else cp docs/irrecon.1 $@; fi

# Program, libraries (shared with soname libirrecon.so.0, and static),
# headers, group tables, man page and pkg-config file under $(DESTDIR)$(PREFIX).
install: all $(BUILD)/irrecon.pc $(BUILD)/irrecon.1
	install -d $(DESTDIR)$(BINDIR) $(DESTDIR)$(LIBDIR)/pkgconfig $(DESTDIR)$(INCDIR)/irrecon \
	           $(DESTDIR)$(DATADIR)/group-tables $(DESTDIR)$(MANDIR)/man1
	install -m 755 $(BUILD)/irrecon $(DESTDIR)$(BINDIR)/irrecon
	install -m 644 $(BUILD)/libirrecon.a $(DESTDIR)$(LIBDIR)/libirrecon.a
	install -m 755 $(BUILD)/libirrecon.so $(DESTDIR)$(LIBDIR)/libirrecon.so.$(VERSION)
	ln -sf libirrecon.so.$(VERSION) $(DESTDIR)$(LIBDIR)/libirrecon.so.0
	ln -sf libirrecon.so.0 $(DESTDIR)$(LIBDIR)/libirrecon.so
	install -m 644 include/irrecon.h $(DESTDIR)$(INCDIR)/irrecon.h
	install -m 644 include/irrecon/*.h $(DESTDIR)$(INCDIR)/irrecon/
	cd group-tables && find . -name '*.json' -exec install -D -m 644 {} $(DESTDIR)$(DATADIR)/group-tables/{} \;
	install -m 644 $(BUILD)/irrecon.1 $(DESTDIR)$(MANDIR)/man1/irrecon.1
	install -m 644 $(BUILD)/irrecon.pc $(DESTDIR)$(LIBDIR)/pkgconfig/irrecon.pc

# Speed and memory figures against their targets; never part of `make test`.
bench: all
	@./tools/ensure-debs python3 python3-rdkit python3-scipy pkg-config
	@BUILD=$(BUILD) ./tools/bench

clean:
	rm -rf $(BUILD) build-san build-fuzz

-include $(LIB_OBJ:.o=.d) $(CLI_OBJ:.o=.d)
