#json: the JSON contract of show, nernst and weigh
solution bath; add NaCl 140; add KCl 5; add CaCl2 2
solution pip; add KCl 140; add NaCl 10
show bath
nernst pip bath
weigh 100
add CdCl2 0.1
add NoSuchThing 1
