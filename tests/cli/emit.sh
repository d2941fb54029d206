# emit.sh - `saltpan check --emit tokens|ast|ir|llvm` print each stage's form of a spec.
source "$(dirname "$0")/lib/common.bash"
HH="$SRC/specs/reference/squid_axon_1952.saltpan"
expect_rc tokens 0 check --emit tokens "$HH"
expect_grep tokens out "^[0-9]+:[0-9]+ 'model' 'model'"
expect_rc ast 0 check --emit ast "$HH"
expect_grep ast out '^compartment axon <'
expect_rc ir 0 check --emit ir "$HH"
expect_grep ir out '^state 1 axon\.SquidSodium1952\.m = 0\.0529324'
expect_grep ir out '^param 1 axon\.SquidSodium1952\.density = 1200$'
expect_rc llvm 0 check --emit llvm "$HH"
expect_grep llvm out '^define void @saltpan_kernel_0\('
expect_rc bad 64 check --emit bytecode "$HH"
finish
