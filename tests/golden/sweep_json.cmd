#json: the JSON of sweep
solution pip
add KCl 140
solution bath
add NaCl 140
add KCl 5
sweep temp 10 to 30 show ljp pip bath points 3
sweep KCl 5 to 20 in bath show nernst K pip bath points 3
sweep NaCl 0 to 100 in bath show ionic-strength points 3
sweep temp 10 to 30 show ljp pip
