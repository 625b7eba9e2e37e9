# Makefile for ionmix.  `make help` lists the targets.

# ---- user settings (override on the command line or in the environment) ----
PREFIX     ?= /usr/local
BINDIR     ?= $(PREFIX)/bin
MANDIR     ?= $(PREFIX)/share/man
DATADIR    ?= $(PREFIX)/share
# bash-completion's directory for files loaded on demand
COMPLDIR   ?= $(DATADIR)/bash-completion/completions
DESTDIR    ?=
CC         ?= cc
CFLAGS     ?= -O2 -g
CPPFLAGS   ?=
LDFLAGS    ?=
PKG_CONFIG ?= pkg-config
# the Debian interpreter, which has python3-periodictable and python3-scipy
PYTHON     ?= /usr/bin/python3
BUILD      ?= build
# SAN=1 builds with AddressSanitizer and UndefinedBehaviorSanitizer
SAN        ?=
# V=1 shows the full compiler command lines
V          ?=

# ---- project flags, added on top of the user's ----
# HDF5 (NWB recordings): Debian's pkg-config name is hdf5 (an alternative
# for hdf5-serial); take whichever pkg-config finds
HDF5_PC    := $(firstword $(foreach p,hdf5 hdf5-serial,$(shell $(PKG_CONFIG) --exists $(p) 2>/dev/null && echo $(p))))
PKGS       := sqlite3 readline $(HDF5_PC)
PKG_CFLAGS := $(shell $(PKG_CONFIG) --cflags $(PKGS) 2>/dev/null)
# HDF5 is not linked: src/h5lazy.c loads it on the first NWB command (its
# 35 dependent libraries cost more than half of every start otherwise);
# the run-time name comes from the library compiled against
PKG_LIBS   := $(shell $(PKG_CONFIG) --libs sqlite3 readline 2>/dev/null) -ldl
HDF5_LDIR  := $(patsubst -L%,%,$(filter -L%,$(shell $(PKG_CONFIG) --libs-only-L $(HDF5_PC) 2>/dev/null)))
HDF5_DEV   := $(firstword $(wildcard $(addsuffix /libhdf5.so,$(HDF5_LDIR))) $(shell $(CC) -print-file-name=libhdf5.so))
HDF5_SONAME := $(shell objdump -p $(HDF5_DEV) 2>/dev/null | awk '/SONAME/ { print $$2 }')
H5_DEFS    := -DIM_HDF5_SONAME='"$(or $(HDF5_SONAME),libhdf5.so)"' -DIM_HDF5_DEVLIB='"$(HDF5_DEV)"'
CMOCKA     := $(shell $(PKG_CONFIG) --cflags --libs cmocka 2>/dev/null)
IM_CFLAGS  := -std=c11 -D_POSIX_C_SOURCE=200809L -D_DEFAULT_SOURCE \
              -Wall -Wextra -Wstrict-prototypes -MMD -MP \
              -Isrc -I$(BUILD)/gen $(PKG_CFLAGS)
IM_LIBS    := $(PKG_LIBS) -lm
ifeq ($(SAN),1)
IM_CFLAGS  += -fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=undefined
IM_LDFLAGS := -fsanitize=address,undefined
endif
ALL_CFLAGS := $(IM_CFLAGS) $(CPPFLAGS) $(CFLAGS)
ifeq ($(V),1)
Q          :=
say        := @true
else
Q          := @
say        := @printf '  %-6s %s\n'
endif

VERSION    := $(shell cat VERSION 2>/dev/null || echo 0.0.0)

# ---- what gets built ----
SRC        := $(wildcard src/*.c)
LIBSRC     := $(filter-out src/main.c,$(SRC))
LIBOBJ     := $(patsubst src/%.c,$(BUILD)/obj/%.o,$(LIBSRC)) $(BUILD)/obj/refdata.o \
              $(BUILD)/obj/reftables.o
# reference data, embedded in this order: schema, sources, then the rest
DATA_FIRST := data/schema.sql data/sources.sql data/ions.sql data/compounds.sql
DATA_SQL   := $(DATA_FIRST) $(sort $(filter-out $(DATA_FIRST),$(wildcard data/*.sql)))
TESTSRC    := $(wildcard tests/test_*.c)
TESTBIN    := $(patsubst tests/%.c,$(BUILD)/tests/%,$(TESTSRC))
BENCHSRC   := $(wildcard tests/bench_*.c)
BENCHBIN   := $(patsubst tests/%.c,$(BUILD)/tests/%,$(BENCHSRC))

.PHONY: all run check test bench install uninstall clean deps deps-test help

all: $(BUILD)/ionmix $(BUILD)/ionmix.bash

help:
	@echo "make            build $(BUILD)/ionmix"
	@echo "make run        check dependencies, build, start the shell"
	@echo "make check      check dependencies, run every test, plain and under ASan+UBSan"
	@echo "make bench      run the benchmarks and print a table of figures and goals"
	@echo "make fuzz       run each libFuzzer target for FUZZ_SECONDS (default 60)"
	@echo "make fuzz-merge add the inputs make fuzz found that reach new code to tests/fuzz/corpus"
	@echo "make check-valgrind  every test program and golden script under valgrind"
	@echo "make install    install to \$$(DESTDIR)\$$(PREFIX) (PREFIX=$(PREFIX))"
	@echo "make clean      remove $(BUILD)/ (BUILD=DIR: another build directory)"

deps:
	@sh src/tools/ensure-deps.sh build

deps-test:
	@sh src/tools/ensure-deps.sh test

run: deps
	@$(MAKE) --no-print-directory all
	$(BUILD)/ionmix

check: deps-test
	@$(MAKE) --no-print-directory test BUILD=build
	@$(MAKE) --no-print-directory test BUILD=build/san SAN=1 CFLAGS="-O1 -g"
	@$(MAKE) --no-print-directory fuzz-smoke

test: $(BUILD)/ionmix $(BUILD)/ionmix.bash $(TESTBIN)
	@IONMIX=$(BUILD)/ionmix PYTHON=$(PYTHON) TESTBIN_DIR=$(BUILD)/tests \
		IONMIX_BUILD=$(BUILD) IONMIX_SAN=$(SAN) \
		sh tests/run.sh "$(BUILD)" $(TESTBIN)

bench: deps-test
	@$(MAKE) --no-print-directory all $(BENCHBIN)
	@IONMIX=build/ionmix PYTHON=$(PYTHON) sh tests/bench.sh build

$(BUILD)/ionmix: $(BUILD)/obj/main.o $(LIBOBJ)
	$(say) LINK $@
	$(Q)$(CC) $(IM_LDFLAGS) $(LDFLAGS) -o $@ $^ $(IM_LIBS)

$(BUILD)/libionmix.a: $(LIBOBJ)
	$(say) AR $@
	$(Q)rm -f $@
	$(Q)ar rcs $@ $^

$(BUILD)/obj/%.o: src/%.c $(BUILD)/gen/version.h | $(BUILD)/obj
	$(say) CC $<
	$(Q)$(CC) $(ALL_CFLAGS) -c -o $@ $<

$(BUILD)/obj/h5lazy.o: ALL_CFLAGS += $(H5_DEFS)

$(BUILD)/obj/refdata.o: $(BUILD)/gen/refdata.c | $(BUILD)/obj
	$(say) CC $<
	$(Q)$(CC) $(ALL_CFLAGS) -c -o $@ $<

# A small host tool embeds the SQL text and the database it builds
# (serialized), and fails the build when the SQL breaks a foreign key.
$(BUILD)/gen/refdata.c: $(BUILD)/embed $(DATA_SQL) | $(BUILD)/gen
	$(say) EMBED "$(DATA_SQL)"
	$(Q)$(BUILD)/embed $(DATA_SQL) > $@.tmp && mv $@.tmp $@

# The reference data as C tables (src/reftab.h), so a start runs no SQL:
# a host tool linked with the loaders themselves (refdb.c, eqdata.c with
# IM_NO_TABLES) loads and checks the image above and writes what they
# built.  A failing check of the data fails the build here.
REFDUMP_SRC := src/tools/refdump.c src/refdb.c src/eqdata.c src/common.c

$(BUILD)/gen/reftables.c: $(BUILD)/refdump | $(BUILD)/gen
	$(say) GEN $@
	$(Q)$(BUILD)/refdump > $@.tmp && mv $@.tmp $@

$(BUILD)/refdump: $(REFDUMP_SRC) $(BUILD)/gen/refdata.c $(wildcard src/*.h) | $(BUILD)/gen
	$(say) CC $@
	$(Q)$(CC) -std=c11 -D_POSIX_C_SOURCE=200809L -D_DEFAULT_SOURCE -Wall -Wextra -O1 \
		-DIM_NO_TABLES -Isrc -I$(BUILD)/gen $(CPPFLAGS) $(PKG_CFLAGS) -o $@ \
		$(REFDUMP_SRC) $(BUILD)/gen/refdata.c $(PKG_LIBS) -lm

$(BUILD)/obj/reftables.o: $(BUILD)/gen/reftables.c | $(BUILD)/obj
	$(say) CC $<
	$(Q)$(CC) $(ALL_CFLAGS) -c -o $@ $<

$(BUILD)/embed: src/tools/embed.c | $(BUILD)/gen
	$(say) CC $<
	$(Q)$(CC) -std=c11 -Wall -Wextra -O1 $(CPPFLAGS) $(PKG_CFLAGS) -o $@ $< $(PKG_LIBS)

$(BUILD)/gen/version.h: VERSION | $(BUILD)/gen
	$(Q)printf '#define IONMIX_VERSION "%s"\n' "$(VERSION)" > $@.tmp && mv $@.tmp $@

$(BUILD)/tests/%: tests/%.c $(BUILD)/libionmix.a tests/testutil.h | $(BUILD)/tests
	$(say) CC $<
	$(Q)$(CC) $(ALL_CFLAGS) $(IM_LDFLAGS) $(LDFLAGS) -o $@ $< $(BUILD)/libionmix.a $(CMOCKA) $(IM_LIBS)

$(BUILD)/obj $(BUILD)/gen $(BUILD)/tests:
	$(Q)mkdir -p $@

# The bash completion file, generated from the command table by a small
# tool linked with the library, and the options the binary's --help names.
$(BUILD)/mkcompletion: src/tools/mkcompletion.c $(BUILD)/libionmix.a
	$(say) CC $<
	$(Q)$(CC) $(ALL_CFLAGS) $(IM_LDFLAGS) $(LDFLAGS) -o $@ $< $(BUILD)/libionmix.a $(IM_LIBS)

$(BUILD)/ionmix.bash: $(BUILD)/mkcompletion $(BUILD)/ionmix
	$(say) GEN $@
	$(Q)opts=$$($(BUILD)/ionmix --help | grep -E '^  +-' | \
		grep -oE -- '--?[a-z][a-z-]*' | sort -u) && [ -n "$$opts" ] && \
		$(BUILD)/mkcompletion $$opts > $@.tmp && mv $@.tmp $@

# Installed: the binary, the man page (its examples name the installed
# recipes), the bash completion file and the demo recipes.
RECIPES    := $(wildcard recipes/*.ionmix)
install: $(BUILD)/ionmix $(BUILD)/ionmix.bash
	install -d $(DESTDIR)$(BINDIR) $(DESTDIR)$(MANDIR)/man1 $(DESTDIR)$(COMPLDIR) \
		$(DESTDIR)$(DATADIR)/ionmix/recipes
	install -m 755 $(BUILD)/ionmix $(DESTDIR)$(BINDIR)/ionmix
	sed -e 's|/usr/local/share/ionmix/recipes|$(DATADIR)/ionmix/recipes|g' \
		-e 's|/usr/local/share/bash-completion/completions|$(COMPLDIR)|g' src/ionmix.1 \
		> $(BUILD)/ionmix.1.tmp
	install -m 644 $(BUILD)/ionmix.1.tmp $(DESTDIR)$(MANDIR)/man1/ionmix.1
	rm -f $(BUILD)/ionmix.1.tmp
	install -m 644 $(BUILD)/ionmix.bash $(DESTDIR)$(COMPLDIR)/ionmix
	install -m 644 $(RECIPES) $(DESTDIR)$(DATADIR)/ionmix/recipes

uninstall:
	rm -f $(DESTDIR)$(BINDIR)/ionmix $(DESTDIR)$(MANDIR)/man1/ionmix.1 \
		$(DESTDIR)$(COMPLDIR)/ionmix
	rm -f $(addprefix $(DESTDIR)$(DATADIR)/ionmix/recipes/,$(notdir $(RECIPES)))
	-rmdir $(DESTDIR)$(DATADIR)/ionmix/recipes $(DESTDIR)$(DATADIR)/ionmix 2>/dev/null

# Only the build directory: BUILD=out makes `make clean` remove out/, and a
# BUILD that is empty, the source tree or a parent of it is refused.
clean:
	@case "$(BUILD)" in ""|.|./|..|../*|/|src|src/|tests|tests/|data|data/) \
		echo "make clean: refusing to remove BUILD='$(BUILD)'" >&2; exit 1;; esac
	rm -rf -- "$(BUILD)"

# ---- fuzzing and valgrind (robustness) ----
# `make fuzz` runs every libFuzzer target tests/fuzz/fuzz_*.c for
# FUZZ_SECONDS each, `make fuzz-smoke` for FUZZ_SMOKE_SECONDS each (the
# last step of `make check`); any crash, leak or sanitizer report fails,
# and the input is kept in build/fuzz/artifacts/.  The library is rebuilt
# with clang and coverage instrumentation in build/fuzz.
# `make check-valgrind` runs every cmocka program and the golden scripts
# under valgrind; any invalid access or definite/indirect leak fails.
FUZZ_CC            ?= clang
FUZZ_SECONDS       ?= 60
FUZZ_SMOKE_SECONDS ?= 3
FUZZ_BUILD         := build/fuzz
# UBSan without its pointer-overflow check here (the ASan+UBSan build of
# `make check` keeps it): it guards every pointer step of every loop, and
# the branch it adds is an edge that libFuzzer counts and scores on every
# run; fuzz_recipe ran about 10 % slower with it.  An index out of range is
# still caught by ASan when it is used.
FUZZ_SAN           := -fsanitize=address,undefined -fno-sanitize-recover=undefined \
                      -fno-sanitize=pointer-overflow -fno-omit-frame-pointer
# the standard define of fuzz builds: the solvers bound the work one input
# can ask for (see DEVELOPERS.md, Fuzzing); set here alone
FUZZ_DEFS          := -DFUZZING_BUILD_MODE_UNSAFE_FOR_PRODUCTION
FUZZ_NAMES         := $(patsubst tests/fuzz/%.c,%,$(wildcard tests/fuzz/fuzz_*.c))
FUZZ_BIN           := $(addprefix $(FUZZ_BUILD)/bin/,$(FUZZ_NAMES))
VALGRIND           ?= valgrind
VALGRIND_FLAGS     := -q --error-exitcode=1 --leak-check=full \
                      --errors-for-leak-kinds=definite,indirect

.PHONY: fuzz fuzz-merge fuzz-smoke fuzz-build fuzz-lib fuzz-bins check-valgrind

fuzz-build:
	@$(MAKE) --no-print-directory fuzz-lib BUILD=$(FUZZ_BUILD) SAN= \
		CC=$(FUZZ_CC) CFLAGS="-O1 -g -fsanitize=fuzzer-no-link $(FUZZ_SAN) $(FUZZ_DEFS)"
	@$(MAKE) --no-print-directory fuzz-bins

fuzz-lib: $(BUILD)/libionmix.a
	@:

# The numeric modules, the renderer (and refdb, whose name lookups
# libFuzzer still learns from through its strcmp hooks) keep their edge
# coverage, ASan and UBSan but not libFuzzer's comparison tracing
# (trace-cmp): their compares are of loop indices, counts and flags, never
# of input bytes; tracing the solvers' took about 70 % of the time of
# fuzz_recipe's seeds (12.2 s before, 3.4 s after), and the others' about
# 2 % of a run's samples (perf).  The harnesses likewise: their compares are of the output they
# check.  The parsers and command handlers keep it.
FUZZ_NO_TRACE_CMP  := diffusion junction speciation titrate targets refdb \
                      ghk render solution osmotic eqdata plot nernst electrode \
                      roots activity ljp weigh
ifeq ($(BUILD),$(FUZZ_BUILD))
$(patsubst %,$(FUZZ_BUILD)/obj/%.o,$(FUZZ_NO_TRACE_CMP)): \
	ALL_CFLAGS += -fno-sanitize-coverage=trace-cmp
# the flags above live here: a change to them rebuilds the fuzz objects
$(LIBOBJ): Makefile
endif

fuzz-bins: $(FUZZ_BIN)
	@:

$(FUZZ_BUILD)/bin/%: tests/fuzz/%.c tests/fuzz/fuzzutil.h $(FUZZ_BUILD)/libionmix.a Makefile
	$(say) FUZZ $<
	$(Q)mkdir -p $(@D)
	$(Q)$(FUZZ_CC) -std=c11 -D_POSIX_C_SOURCE=200809L -D_DEFAULT_SOURCE -Wall -Wextra \
		-O1 -g -fsanitize=fuzzer -fno-sanitize-coverage=trace-cmp $(FUZZ_SAN) \
		$(FUZZ_DEFS) -Isrc $(CPPFLAGS) $(PKG_CFLAGS) -o $@ $< \
		$(FUZZ_BUILD)/libionmix.a $(IM_LIBS)

fuzz: fuzz-build
	@sh tests/fuzz/run.sh $(FUZZ_BUILD) $(FUZZ_SECONDS) $(FUZZ_NAMES)

# add what `make fuzz` found that reaches new code to tests/fuzz/corpus
fuzz-merge: fuzz-build
	@sh tests/fuzz/merge.sh $(FUZZ_BUILD) $(FUZZ_NAMES)

fuzz-smoke: fuzz-build
	@FUZZ_FRESH=1 sh tests/fuzz/run.sh $(FUZZ_BUILD) $(FUZZ_SMOKE_SECONDS) $(FUZZ_NAMES)

check-valgrind: $(BUILD)/ionmix $(TESTBIN)
	@mkdir -p $(BUILD)/tests/log; fail=0; \
	for t in $(TESTBIN); do \
		n=$$(basename $$t); \
		if $(VALGRIND) $(VALGRIND_FLAGS) $$t >$(BUILD)/tests/log/valgrind-$$n.txt 2>&1; \
		then echo "valgrind: $$n clean"; \
		else echo "valgrind: $$n FAILED (log $(BUILD)/tests/log/valgrind-$$n.txt)"; fail=1; \
			grep -vE '^==[0-9]+==' $(BUILD)/tests/log/valgrind-$$n.txt | grep -E 'ERROR|FAIL' | head -n 10; \
			grep -A8 -E '^==[0-9]+== (Invalid|Conditional|Use of uninit|Syscall param|Mismatched|.*(definitely|indirectly) lost in)' \
				$(BUILD)/tests/log/valgrind-$$n.txt | head -n 40; fi; \
	done; \
	printf '#!/bin/sh\nexec %s %s "%s" "$$@"\n' '$(VALGRIND)' '$(VALGRIND_FLAGS)' \
		'$(CURDIR)/$(BUILD)/ionmix' >$(BUILD)/ionmix-valgrind; \
	chmod +x $(BUILD)/ionmix-valgrind; \
	if sh tests/golden.sh $(BUILD)/ionmix-valgrind >$(BUILD)/tests/log/valgrind-golden.txt 2>&1; \
	then echo "valgrind: golden scripts clean ($$(tail -n 1 $(BUILD)/tests/log/valgrind-golden.txt))"; \
	else echo "valgrind: golden scripts FAILED"; fail=1; \
		head -n 60 $(BUILD)/tests/log/valgrind-golden.txt; fi; \
	[ $$fail -eq 0 ] && echo "check-valgrind: clean" || { echo "check-valgrind: FAILED"; exit 1; }

-include $(wildcard $(BUILD)/obj/*.d $(BUILD)/tests/*.d)
