# Saving, loading, listing and exporting a recipe, then replaying it.
solution bath
add NaCl 140
add KCl 5
save
set NaCl 1
load bath
show
list
export bath exported.tmp
solution bath
clear
run exported.tmp
show
delete bath
list
